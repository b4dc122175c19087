import { describe, expect, it } from 'vitest';
import { parsePosition } from '../../../src/core/layout/index.js';

// Grammar: <position> of CSS Values and Units Level 4, §9.1 (used by object-position, CSS
// Images Level 3 §5.6); meaning of keywords and percentages: CSS Backgrounds and Borders
// Level 3, §3.6 ("left" = 0 %, "center" = 50 %, "right" = 100 %; one value centres the other
// axis; "right 10%" is 10 % from the right edge).
describe('parsePosition', () => {
  it.each([
    ['center', 0.5, 0.5],
    ['left', 0, 0.5],
    ['right', 1, 0.5],
    ['top', 0.5, 0],
    ['bottom', 0.5, 1],
    ['30%', 0.3, 0.5],
    ['left top', 0, 0],
    ['top left', 0, 0],
    ['right bottom', 1, 1],
    ['bottom right', 1, 1],
    ['center top', 0.5, 0],
    ['top center', 0.5, 0],
    ['center left', 0, 0.5],
    ['30% 70%', 0.3, 0.7],
    ['left 25%', 0, 0.25],
    ['25% bottom', 0.25, 1],
    ['0% 100%', 0, 1],
    ['12.5% .5%', 0.125, 0.005],
    ['right 10% bottom 20%', 0.9, 0.8],
    ['bottom 20% right 10%', 0.9, 0.8],
    ['left 0% top 40%', 0, 0.4],
    ['  LEFT   Top ', 0, 0],
  ])('%s -> %s %s', (text, x, y) => {
    const p = parsePosition(text);
    expect(p?.x).toBeCloseTo(x, 12);
    expect(p?.y).toBeCloseTo(y, 12);
  });

  it.each([
    '',
    'middle',
    'left right',
    'top bottom',
    'top 30%', // with a percentage the first value is horizontal
    '30% left',
    '10px 20px',
    '-5%',
    '101%',
    '50',
    'left top center',
    'center 10% top 10%',
    'left 10% right 10%',
    '30%% 10%',
    'NaN%',
    // CSS Syntax 3, 'consume a number' (from memory): a number needs digits after its point.
    '50.%',
    '1.e2%',
    // Names an object literal inherits are not keywords.
    'constructor',
    '__proto__',
    'constructor 10% top 20%',
  ])('refuses %j', (text) => {
    expect(parsePosition(text)).toBeUndefined();
  });
});
