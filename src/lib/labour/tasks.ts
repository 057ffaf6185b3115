/**
 * The fixed list of tasks crew hours are logged against. Calibration compares the hours of
 * each task with the bid's measure for it (per hole, per linear foot, per gate).
 */
export const TIME_TASKS = ['dig_set_posts', 'rails_infill', 'gates', 'cleanup', 'travel_other'] as const;
export type TimeTask = (typeof TIME_TASKS)[number];

export const TIME_TASK_LABELS: Record<TimeTask, string> = {
  dig_set_posts: 'Dig and set posts',
  rails_infill: 'Hang rails and infill',
  gates: 'Gates',
  cleanup: 'Clean-up',
  travel_other: 'Travel and other',
};

/** What a task's hours are divided by when they are compared with a bid. */
export const TIME_TASK_MEASURE: Record<TimeTask, 'hole' | 'linear_ft' | 'gate' | 'job'> = {
  dig_set_posts: 'hole',
  rails_infill: 'linear_ft',
  gates: 'gate',
  cleanup: 'job',
  travel_other: 'job',
};

const SYNONYMS: Record<TimeTask, string[]> = {
  dig_set_posts: ['dig', 'digging', 'posts', 'set posts', 'dig and set posts', 'dig set posts', 'post setting', 'holes', 'auger'],
  rails_infill: ['rails', 'infill', 'rails and infill', 'hang rails and infill', 'hang rails', 'pickets', 'panels', 'fabric', 'stringing', 'framing'],
  gates: ['gate', 'gates', 'hang gates', 'gate hanging'],
  cleanup: ['clean-up', 'cleanup', 'clean up', 'haul off', 'haul-off', 'tidy'],
  travel_other: ['travel', 'other', 'travel and other', 'travel/other', 'drive', 'driving', 'loading', 'yard'],
};

/** "Dig and set posts", "dig_set_posts" or "posts" → dig_set_posts; null when unknown. */
export function parseTask(raw: string | null | undefined): TimeTask | null {
  const t = (raw ?? '').trim().toLowerCase().replace(/\s+/g, ' ');
  if (!t) return null;
  if ((TIME_TASKS as readonly string[]).includes(t)) return t as TimeTask;
  for (const task of TIME_TASKS) {
    if (TIME_TASK_LABELS[task].toLowerCase() === t || SYNONYMS[task].includes(t)) return task;
  }
  return null;
}
