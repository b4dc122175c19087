import { describe, expect, it } from 'vitest';
import { prefersHtml } from '../../../src/http/pages/accept.js';

// Accept headers as browsers and tools send them (RFC 9110, section 12.5.1 for the q rules;
// the browser strings from memory of Chromium and Firefox navigations and image requests).
describe('prefersHtml', () => {
  it.each([
    ['text/html,application/xhtml+xml,application/xml;q=0.9,image/avif,image/webp,*/*;q=0.8', true], // a navigation
    ['text/html', true],
    ['*/*', false], // curl, fetch()
    [undefined, false],
    ['', false],
    ['image/avif,image/webp,image/apng,image/svg+xml,image/*,*/*;q=0.8', false], // an <img> request
    ['application/json, text/html', false], // a tie goes to the machine form
    ['application/problem+json', false],
    ['text/html;q=0.5, application/json', false],
    ['text/html, application/json;q=0.9', true],
    ['text/*, application/json;q=0.5', true],
    ['text/html;q=0', false],
    ['text/html;q=junk', false],
  ])('%s -> %s', (accept, html) => {
    expect(prefersHtml(accept)).toBe(html);
  });
});
