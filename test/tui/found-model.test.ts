import { describe, expect, it } from 'vitest';
import { FOUND_DROP_ORDER, foundColumns } from '../../src/tui/found.js';

// Column widths of the discovered table (src/tui/found.ts): mark 1, rank 3, part 8, headroom 13, lift 6,
// gap 6, q 6, dev 5, floor 5, share 5, each with one separator; the conditions take the rest, 24 to 44.
describe('foundColumns', () => {
  it('drops the optional columns in FOUND_DROP_ORDER as the width shrinks', () => {
    expect(FOUND_DROP_ORDER).toEqual(['share', 'floor', 'dev', 'q', 'gap']);
    const ids = (w: number) => foundColumns(w).map((c) => c.id);
    const label = (w: number) => foundColumns(w).find((c) => c.id === 'label')!.width;
    // 120: fixed 2+4+9+14+7+7+7+6+6+6 = 68, 120 − 68 = 52 ≥ 24: all kept, conditions capped at 44 (hand arithmetic)
    expect(ids(120)).toEqual(['mark', 'rank', 'label', 'part', 'headroom', 'lift', 'gap', 'q', 'dev', 'floor', 'share']);
    expect(label(120)).toBe(44);
    // 80: 80 − 68 = 12, without share 18, without floor 80 − 56 = 24 (hand arithmetic)
    expect(ids(80)).toEqual(['mark', 'rank', 'label', 'part', 'headroom', 'lift', 'gap', 'q', 'dev']);
    expect(label(80)).toBe(24);
    // 60: down to mark, rank, part, headroom, lift: 2+4+9+14+7 = 36, 60 − 36 = 24 (hand arithmetic)
    expect(ids(60)).toEqual(['mark', 'rank', 'label', 'part', 'headroom', 'lift']);
    expect(label(60)).toBe(24);
    // 40: nothing more to drop; the conditions get 40 − 36 = 4, at least 6 (hand arithmetic)
    expect(label(40)).toBe(6);
  });
});
