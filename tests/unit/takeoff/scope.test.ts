import { describe, expect, it } from 'vitest';
import { computeTakeoff, type Takeoff } from '../../../src/lib/takeoff/takeoff';
import { recipeFor, ratesFor } from '../../../src/lib/takeoff/defaults';
import { layoutInput, NO_SITE_RULES } from '../../../src/lib/takeoff/input';
import { fenceSummary, scopeSentence } from '../../../src/lib/bids/scope';

const take = (kind: string, layout: unknown): Takeoff => {
  const t = computeTakeoff(layoutInput.parse(layout), recipeFor(kind), ratesFor(kind), NO_SITE_RULES);
  if (!t.ok) throw new Error(JSON.stringify(t.fields));
  return t;
};

describe('the printed bid says what the style builds', () => {
  it('a split-rail fence has no concrete and never reads "set in concrete"', () => {
    const t = take('split_rail', { runs: [{ lengthFt: 100, heightIn: 48 }], gates: [{ runIndex: 0, widthFt: 4 }] });
    const s = scopeSentence('Split rail 4 ft', recipeFor('split_rail'), t);
    expect(t.concrete).toBeNull();
    expect(s).not.toMatch(/in concrete/);
    expect(s).toContain(`${t.posts.total} posts (Cedar split-rail post, 3-hole) set in tamped earth, without concrete, on a 4 in gravel base`);
    expect(s).toContain('1 × Split-rail walk gate');
    expect(s).toMatch(/^Split rail 4 ft: 96 ft of fence; /);
  });

  it('a wood privacy fence is set in concrete, with its rails, pickets and gates', () => {
    const t = take('wood_privacy', { runs: [{ lengthFt: 40, heightIn: 72 }] });
    const s = scopeSentence('Wood privacy 6 ft', recipeFor('wood_privacy'), t);
    expect(s).toBe('Wood privacy 6 ft: 40 ft of fence; 6 posts (4×4 treated post) set in concrete on a 4 in gravel base; 2×4 treated rail; Cedar dog-ear picket 1×6 × 6 ft; no gates.');
  });

  it('a chain-link fence names the fabric bought for its height and its terminal posts', () => {
    const t = take('chain_link', { runs: [{ lengthFt: 100, heightIn: 48 }] });
    const s = scopeSentence('Chain link 4 ft', recipeFor('chain_link'), t);
    expect(s).toContain('Chain-link fabric 11½ ga, 48 in × 50 ft roll');
    expect(s).toContain('Galvanized terminal post 2⅜ in at ends, corners and gates) set in concrete');
  });

  it('falls back on the takeoff when the saved recipe no longer reads', () => {
    const t = take('split_rail', { runs: [{ lengthFt: 50, heightIn: 48 }] });
    expect(scopeSentence('Old style', { nope: true }, t)).toMatch(/^Old style: 50 ft of fence; 6 posts set in tamped earth, without concrete, on a gravel base; /);
  });
});

describe('a fence in a few words', () => {
  it('adds the runs, counts the gates, and counts a length not yet entered as nothing', () => {
    expect(fenceSummary('Wood privacy 6 ft', [40, 24], 1)).toBe('Wood privacy 6 ft, 64 ft, 1 gate');
    expect(fenceSummary('Chain link 4 ft', [80.25, Number.NaN], 2)).toBe('Chain link 4 ft, 80.3 ft, 2 gates');
    expect(fenceSummary('Split rail 3-rail', [], 0)).toBe('Split rail 3-rail, 0 ft, 0 gates');
  });
});
