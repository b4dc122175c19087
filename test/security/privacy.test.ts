/**
 * Privacy: a source carrying EXIF (with a GPS IFD), XMP and a creator name yields renditions
 * with none of it, in every output format. Location in photos is personal data; an image
 * service that copies it onward publishes where a picture was taken (common practice).
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';

const secret = 'weaver-home-address';
const xmp = `<x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#"><rdf:Description xmlns:dc="http://purl.org/dc/elements/1.1/"><dc:creator>${secret}</dc:creator></rdf:Description></rdf:RDF></x:xmpmeta>`;

/** True when a TIFF-structured EXIF block holds tag 0x8825, the GPS IFD pointer (EXIF 2.32, 4.6.3). */
function hasGpsPointer(exif: Buffer): boolean {
  const le = exif.includes(Buffer.from('II*\0'));
  const tag = le ? Buffer.from([0x25, 0x88]) : Buffer.from([0x88, 0x25]);
  return exif.includes(tag);
}

let t: TestApp;
let source: Buffer;
beforeAll(async () => {
  t = await build();
  source = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#806040' } })
    .withExif({
      IFD0: { Copyright: 'Selvedge Textiles', Artist: secret },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' },
    })
    .withXmp(xmp)
    .jpeg()
    .toBuffer();
  await writeFile(join(t.sourceDir, 'tagged.jpg'), source);
});
afterAll(() => t.close());

describe('metadata is stripped from renditions', () => {
  it('the source really carries EXIF with GPS, and XMP (so the checks below can fail)', async () => {
    const meta = await sharp(source).metadata();
    expect(meta.exif && hasGpsPointer(meta.exif)).toBe(true);
    expect(meta.xmp?.toString()).toContain(secret);
  });

  it.each(['jpeg', 'png', 'webp', 'avif'])('%s output has no EXIF, GPS, XMP or IPTC', async (format) => {
    const res = await t.app.inject({ url: `/v1/renditions/tagged.jpg?width=32&format=${format}` });
    expect(res.statusCode).toBe(200);
    const meta = await sharp(res.rawPayload).metadata();
    expect(meta.exif).toBeUndefined();
    expect(meta.xmp).toBeUndefined();
    expect(meta.iptc).toBeUndefined();
    expect(res.rawPayload.includes(Buffer.from(secret))).toBe(false);
    expect(res.rawPayload.includes(Buffer.from('Exif\0\0'))).toBe(false);
  });
});
