import { describe, expect, it } from 'vitest';
import { renditionKey } from '../../src/rendition/key.js';

describe('renditionKey', () => {
  const id = { key: 'fabrics/twill.jpg', version: '123-456' };

  it('is a SHA-256 hex digest that repeats for the same inputs (memoised or not)', () => {
    const a = renditionKey(id, 'width=480', 'jpeg');
    expect(a).toMatch(/^[0-9a-f]{64}$/);
    expect(renditionKey({ ...id }, 'width=480', 'jpeg')).toBe(a);
  });

  it('changes with every part: source key, version, canonical query, format', () => {
    const base = renditionKey(id, 'width=480', 'jpeg');
    const variants = [
      renditionKey({ ...id, key: 'fabrics/twill2.jpg' }, 'width=480', 'jpeg'),
      renditionKey({ ...id, version: '123-457' }, 'width=480', 'jpeg'),
      renditionKey(id, 'width=481', 'jpeg'),
      renditionKey(id, 'width=480', 'negotiated:webp/webp'),
      // Parts that would run together if simply concatenated stay apart.
      renditionKey({ key: 'fabrics/twill.jpg1', version: '23-456' }, 'width=480', 'jpeg'),
    ];
    expect(new Set([base, ...variants]).size).toBe(variants.length + 1);
  });
});
