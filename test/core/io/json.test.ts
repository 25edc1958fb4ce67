import { describe, expect, it } from 'vitest';
import { formatJson, lineColumn, locateJsonError } from '../../../src/core/io/json.ts';
import { mutateText, randInt, rng } from './random.ts';

describe('locateJsonError', () => {
  it('agrees with the engine’s JSON.parse on which mutated texts are valid (seeded)', () => {
    // Outside reference: the JavaScript engine's own JSON parser (ECMA-262 JSON.parse).
    const r = rng(8);
    const base = '{"a": [1, -2.5e-3, {"b": "x\\"y\\u00e9"}], "c": true, "d": null, "e": {}}';
    let valid = 0;
    for (let trial = 0; trial < 3000; trial++) {
      const t = mutateText(r, base);
      let engineOk = true;
      try {
        JSON.parse(t);
      } catch {
        engineOk = false;
      }
      const found = locateJsonError(t);
      expect(found === null, `text ${JSON.stringify(t)}: engine ${engineOk}, ours ${JSON.stringify(found)}`).toBe(engineOk);
      if (found) expect(found.pos).toBeLessThanOrEqual(t.length);
      if (engineOk) valid++;
    }
    expect(valid).toBeGreaterThan(100);
  });
  it.each([
    ['{"a": 1,}', 8, 'trailing comma before }'],
    ['[1 2]', 3, "expected ',' or ']' after an array element, got \"2]\""],
    ['{"a": "x', 6, 'unterminated string'],
    ['{"a": 01}', 6, 'malformed number "01}"'],
    ['', 0, 'expected a value, got the end of the file'],
  ])('%j → position %i', (text, pos, reason) => {
    expect(locateJsonError(text)).toEqual({ pos, reason });
  });
  it('lineColumn counts 1-based lines and columns', () => {
    expect(lineColumn('ab\ncd\nef', 7)).toEqual({ line: 3, column: 2 });
    expect(lineColumn('ab', 0)).toEqual({ line: 1, column: 1 });
  });
});

describe('formatJson', () => {
  it('is read back by JSON.parse to the same value (seeded random documents)', () => {
    const r = rng(3);
    const gen = (depth: number): unknown => {
      const k = randInt(r, depth > 2 ? 4 : 7);
      if (k === 0) return (r() - 0.5) * 10 ** (randInt(r, 40) - 20);
      if (k === 1) return ['', 'a"b', 'é\n'][randInt(r, 3)];
      if (k === 2) return [true, false, null][randInt(r, 3)];
      if (k === 3) return Array.from({ length: randInt(r, 4) }, () => (r() - 0.5) * 100);
      if (k === 4) return Array.from({ length: randInt(r, 3) }, () => gen(depth + 1));
      return Object.fromEntries(Array.from({ length: randInt(r, 4) }, (_, j) => [`k${j}`, gen(depth + 1)]));
    };
    for (let trial = 0; trial < 200; trial++) {
      const v = gen(0);
      expect(JSON.parse(formatJson(v))).toEqual(v);
    }
  });
  it('writes typed arrays as arrays and non-finite numbers as null', () => {
    expect(JSON.parse(formatJson({ a: Float64Array.of(1, 2), b: Infinity, c: [NaN] }))).toEqual({ a: [1, 2], b: null, c: [null] });
  });
});
