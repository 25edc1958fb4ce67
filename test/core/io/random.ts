/**
 * A tiny seeded generator for the property-style tests (mulberry32, a public-domain 32-bit
 * generator; common practice, no source), and mutations of valid file contents.
 */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function randInt(r: () => number, n: number): number {
  return Math.floor(r() * n);
}

const TEXT_PIECES = [
  '',
  ' ',
  ',',
  '-',
  '.',
  'e',
  'NaN',
  '1e999',
  '"',
  '[',
  ']',
  '{',
  '}',
  ':',
  '\n',
  '0',
  '-1',
  'x',
  '%',
  '#',
  '\t',
  ';',
  '1.5',
  'null',
  'true',
];

/** 1–4 random edits (delete, insert, replace, duplicate a span) of a text. */
export function mutateText(r: () => number, text: string): string {
  let s = text;
  const edits = 1 + randInt(r, 4);
  for (let e = 0; e < edits; e++) {
    const p = randInt(r, s.length + 1);
    const len = 1 + randInt(r, 6);
    switch (randInt(r, 4)) {
      case 0:
        s = s.slice(0, p) + s.slice(p + len);
        break;
      case 1:
        s = s.slice(0, p) + TEXT_PIECES[randInt(r, TEXT_PIECES.length)] + s.slice(p);
        break;
      case 2:
        s = s.slice(0, p) + TEXT_PIECES[randInt(r, TEXT_PIECES.length)] + s.slice(p + len);
        break;
      default:
        s = s.slice(0, p) + s.slice(p, p + len) + s.slice(p);
    }
  }
  return s;
}

/** 1–4 random byte edits (flip, delete, insert, truncate) of binary content. */
export function mutateBytes(r: () => number, bytes: Uint8Array): Uint8Array {
  let b = Array.from(bytes);
  const edits = 1 + randInt(r, 4);
  for (let e = 0; e < edits; e++) {
    const p = randInt(r, b.length + 1);
    switch (randInt(r, 4)) {
      case 0:
        if (p < b.length) b[p] = randInt(r, 256);
        break;
      case 1:
        b.splice(p, 1 + randInt(r, 8));
        break;
      case 2:
        b.splice(p, 0, randInt(r, 256));
        break;
      default:
        b = b.slice(0, p);
    }
  }
  return Uint8Array.from(b);
}
