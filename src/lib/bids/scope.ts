import { recipeSchema } from '../takeoff/recipe.ts';
import type { Takeoff } from '../takeoff/takeoff.ts';

const ft = (x: number) => (Number.isInteger(x) ? String(x) : x.toFixed(1));
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/**
 * What the printed bid says the fence is, worded from the recipe the bid was priced with (so a
 * style with no concrete never reads "set in concrete") and the quantities of its takeoff. No
 * depths: the customer's copy states what is built, not an engineered footing.
 */
export function scopeSentence(styleName: string, savedRecipe: unknown, t: Pick<Takeoff, 'fenceFt' | 'posts' | 'gates' | 'materials' | 'concrete' | 'gravel'>): string {
  const parsed = recipeSchema.safeParse(savedRecipe);
  const recipe = parsed.success ? parsed.data : null;
  // A recipe that no longer reads falls back on the takeoff, which records whether concrete was bought.
  const concrete = recipe ? recipe.hole.concrete !== null : t.concrete !== null;
  const gravelIn = recipe ? (recipe.hole.gravel ? recipe.hole.gravelDepthIn : 0) : t.gravel ? null : 0;

  let posts = `${plural(t.posts.total, 'post')}${recipe ? ` (${recipe.posts.line.label}${recipe.posts.terminal ? `; ${recipe.posts.terminal.label} at ends, corners and gates` : ''})` : ''}`;
  posts += concrete ? ' set in concrete' : ' set in tamped earth, without concrete';
  if (gravelIn !== 0) posts += `${concrete ? '' : ','} on a ${gravelIn === null ? '' : `${ft(gravelIn)} in `}gravel base`;

  const parts = [`${ft(t.fenceFt)} ft of fence`, posts];
  if (recipe?.rails) parts.push(recipe.rails.label);
  const infill = [...new Set(t.materials.filter((m) => m.group === 'infill').map((m) => m.label))];
  if (infill.length) parts.push(infill.join(', '));
  if (recipe?.cap) parts.push(recipe.cap.label);
  const gates: string[] = [];
  if (t.gates.single) gates.push(`${t.gates.single} × ${recipe ? recipe.gates.single.label : 'single gate'}`);
  if (t.gates.double) gates.push(`${t.gates.double} × ${recipe?.gates.double ? recipe.gates.double.label : 'double gate'}`);
  parts.push(gates.length ? gates.join(', ') : 'no gates');
  return `${styleName}: ${parts.join('; ')}.`;
}

/**
 * A fence in a few words, to tell two versions of a bid apart: "Wood privacy 6 ft, 64 ft,
 * 1 gate". Lengths not yet entered (NaN) count as nothing.
 */
export function fenceSummary(styleName: string, runLengthsFt: readonly number[], gateCount: number): string {
  const total = runLengthsFt.reduce((a, b) => a + (Number.isFinite(b) ? b : 0), 0);
  return `${styleName}, ${ft(total)} ft, ${plural(gateCount, 'gate')}`;
}
