import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, quadrantColour, writePng } from '../helpers/images.js';

// Inputs are analytic: flat quadrants whose colours are known at every pixel, so where each
// quadrant lands after fit/position follows from CSS object-fit / object-position (CSS Images
// Module Level 3, §5.5-5.6) without a reference picture.
const RED = [255, 0, 0];
const GREEN = [0, 255, 0];
const BLUE = [0, 0, 255];
const WHITE = [255, 255, 255];

/** Each channel within 2 codes of the expected colour (PNG output is lossless). */
function near(actual: number[], expected: number[]) {
  expect(actual.length).toBe(expected.length);
  actual.forEach((v, i) => expect(Math.abs(v - expected[i])).toBeLessThanOrEqual(2));
}

describe('GET /v1/renditions: fit, position, size and density', () => {
  let t: TestApp;
  const get = (q: string) => t.app.inject({ url: `/v1/renditions/quad.png?format=png&${q}` });
  const image = async (q: string) => {
    const res = await get(q);
    expect(res.statusCode, res.body).toBe(200);
    return pixels(res.rawPayload);
  };

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'quad.png', 200, 100, 3, quadrantColour(200, 100));
  });
  afterAll(() => t.close());

  it('width alone keeps the aspect ratio', async () => {
    const img = await image('width=100');
    expect([img.width, img.height]).toEqual([100, 50]);
    near(at(img, 5, 5), RED);
    near(at(img, 95, 45), WHITE);
  });

  it('height alone keeps the aspect ratio', async () => {
    const img = await image('height=20');
    expect([img.width, img.height]).toEqual([40, 20]);
  });

  it('density multiplies the size (as in srcset)', async () => {
    const img = await image('width=50&density=2');
    expect([img.width, img.height]).toEqual([100, 50]);
    const half = await image('width=100&density=0.5');
    expect([half.width, half.height]).toEqual([50, 25]);
  });

  it('fill distorts to exactly the box', async () => {
    const img = await image('width=60&height=60&fit=fill');
    expect([img.width, img.height]).toEqual([60, 60]);
    near(at(img, 5, 5), RED);
    near(at(img, 55, 5), GREEN);
    near(at(img, 5, 55), BLUE);
    near(at(img, 55, 55), WHITE);
  });

  it('cover crops around the centre', async () => {
    const img = await image('width=50&height=50&fit=cover');
    expect([img.width, img.height]).toEqual([50, 50]);
    // The 100x100 centre of the source: all four quadrants meet in the middle.
    near(at(img, 5, 5), RED);
    near(at(img, 45, 45), WHITE);
  });

  it('cover with position=left top keeps the left-top content', async () => {
    const img = await image('width=50&height=50&fit=cover&position=left%20top');
    // The left 100x100 of the source: only red (top) and blue (bottom). Probes stay clear of
    // the crop's right edge, where the filter rightly reads the green beyond it.
    near(at(img, 35, 10), RED);
    near(at(img, 35, 40), BLUE);
    near(at(img, 5, 45), BLUE);
  });

  it('cover with position=right bottom keeps the right content', async () => {
    const img = await image('width=50&height=50&fit=cover&position=100%25%20100%25');
    near(at(img, 15, 10), GREEN);
    near(at(img, 15, 40), WHITE);
    near(at(img, 45, 45), WHITE);
  });

  it('contain letterboxes with the background colour', async () => {
    const img = await image('width=100&height=100&fit=contain&background=%23102030');
    expect([img.width, img.height]).toEqual([100, 100]);
    near(at(img, 50, 5), [16, 32, 48]); // bar above (picture is 100x50, centred)
    near(at(img, 50, 95), [16, 32, 48]); // bar below
    near(at(img, 10, 30), RED);
    near(at(img, 90, 70), WHITE);
  });

  it('contain with position=top puts the bars below', async () => {
    const img = await image('width=100&height=100&fit=contain&position=top&background=000');
    near(at(img, 10, 10), RED);
    near(at(img, 50, 90), [0, 0, 0]);
  });

  it('scale-down never upscales: the picture keeps its size inside the box', async () => {
    // As if "none" (the smaller of none and contain): 200x100 centred in the 400x400 box.
    const img = await image('width=400&height=400&fit=scale-down&background=000');
    expect([img.width, img.height]).toEqual([400, 400]);
    near(at(img, 5, 5), [0, 0, 0]);
    near(at(img, 110, 160), RED);
    near(at(img, 290, 240), WHITE);
    near(at(img, 200, 260), [0, 0, 0]);
    const one = await image('width=1000&fit=scale-down');
    expect([one.width, one.height]).toEqual([200, 100]);
    const down = await image('width=100&height=100&fit=scale-down');
    expect(down.width).toBeLessThanOrEqual(100);
  });

  it('enlarges when the request allows it (enlarge=allowed)', async () => {
    const img = await image('width=400&enlarge=allowed');
    expect([img.width, img.height]).toEqual([400, 200]);
    near(at(img, 10, 10), RED);
  });
});
