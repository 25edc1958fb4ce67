import { describe, expect, it } from 'vitest';
import { moveMapCursor } from '../../../src/app/select/mapKeys.ts';

// 3 lengths × 4 variances: index = i·4 + j (the layout of EvidenceMap.logEvidence).
const move = (index: number, key: string) => moveMapCursor(index, key, 3, 4);

describe('evidence map keyboard cursor', () => {
  it('steps length with ←/→ and variance with ↑/↓ on the row-major (length, variance) index', () => {
    const start = 1 * 4 + 2; // i = 1, j = 2
    expect(move(start, 'ArrowRight')).toBe(2 * 4 + 2);
    expect(move(start, 'ArrowLeft')).toBe(0 * 4 + 2);
    expect(move(start, 'ArrowUp')).toBe(1 * 4 + 3);
    expect(move(start, 'ArrowDown')).toBe(1 * 4 + 1);
  });

  it('stops at the edges instead of wrapping into the next row', () => {
    expect(move(2 * 4 + 3, 'ArrowRight')).toBe(2 * 4 + 3);
    expect(move(2 * 4 + 3, 'ArrowUp')).toBe(2 * 4 + 3);
    expect(move(0, 'ArrowLeft')).toBe(0);
    expect(move(0, 'ArrowDown')).toBe(0);
  });

  it('jumps to the ends with Home/End (length) and PageUp/PageDown (variance); other keys do nothing', () => {
    expect(move(1 * 4 + 1, 'Home')).toBe(1);
    expect(move(1 * 4 + 1, 'End')).toBe(2 * 4 + 1);
    expect(move(1 * 4 + 1, 'PageUp')).toBe(1 * 4 + 3);
    expect(move(1 * 4 + 1, 'PageDown')).toBe(1 * 4);
    expect(move(5, 'Enter')).toBeNull();
    expect(moveMapCursor(0, 'ArrowRight', 0, 4)).toBeNull();
  });

  it('visits every cell exactly once in a serpentine walk', () => {
    const seen = new Set<number>();
    let k = 0;
    seen.add(k);
    for (let i = 0; i < 3; i++) {
      for (let s = 0; s < 3; s++) seen.add((k = move(k, i % 2 === 0 ? 'ArrowUp' : 'ArrowDown')!));
      if (i < 2) seen.add((k = move(k, 'ArrowRight')!));
    }
    expect([...seen].sort((a, b) => a - b)).toEqual(Array.from({ length: 12 }, (_, n) => n));
  });
});
