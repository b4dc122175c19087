/**
 * A test-side reader of `srcset`, after the HTML Living Standard's "parse a srcset attribute"
 * algorithm (4.8.4.3.10), reduced to what our strings may contain: skip whitespace and
 * commas, take a URL up to whitespace (trailing commas end the candidate), then the
 * descriptors up to the next comma outside parentheses. It is used to check our strings the
 * way a browser reads them.
 */
export interface ParsedCandidate {
  url: string;
  descriptors: string[];
}

export function parseSrcset(input: string): ParsedCandidate[] {
  const out: ParsedCandidate[] = [];
  let pos = 0;
  const isSpace = (ch: string): boolean => /[\t\n\f\r ]/.test(ch);
  while (pos < input.length) {
    while (pos < input.length && (isSpace(input[pos]) || input[pos] === ',')) pos++;
    if (pos >= input.length) break;
    let url = '';
    while (pos < input.length && !isSpace(input[pos])) url += input[pos++];
    let descriptors: string[] = [];
    if (url.endsWith(',')) {
      url = url.replace(/,+$/, '');
    } else {
      let desc = '';
      let inParens = false;
      while (pos < input.length) {
        const ch = input[pos++];
        if (ch === '(') inParens = true;
        if (ch === ')') inParens = false;
        if (ch === ',' && !inParens) break;
        desc += ch;
      }
      descriptors = desc.trim().split(/[\t\n\f\r ]+/).filter(Boolean);
    }
    out.push({ url, descriptors });
  }
  return out;
}

/** Width descriptors of a parsed srcset; throws when a candidate lacks a valid `<n>w`. */
export function widthDescriptors(candidates: readonly ParsedCandidate[]): number[] {
  return candidates.map((c) => {
    // HTML Living Standard: a width descriptor is a valid non-negative integer followed by "w",
    // and greater than zero; one descriptor per candidate.
    if (c.descriptors.length !== 1 || !/^[1-9][0-9]*w$/.test(c.descriptors[0])) {
      throw new Error(`bad descriptor for ${c.url}: ${c.descriptors.join(' ')}`);
    }
    return Number.parseInt(c.descriptors[0], 10);
  });
}
