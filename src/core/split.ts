/**
 * Splits: the four evaluation sets a row can belong to (README, "Splits"), and the one list of the
 * spellings accepted for each. Every reader of a split — the cell query, cells files, export, examples,
 * paired rows, `--splits` — takes them from here.
 */

/** The four evaluation sets. */
export type Split = 'train' | 'train_dev' | 'dev' | 'test';
export const SPLITS: readonly Split[] = ['train', 'train_dev', 'dev', 'test'];

/** The spellings accepted for each split (compared trimmed and in lower case). */
export const SPLIT_SPELLINGS: Readonly<Record<Split, readonly string[]>> = {
  train: ['train'],
  train_dev: ['train_dev', 'train-dev', 'traindev'],
  dev: ['dev', 'val', 'valid', 'validation'],
  test: ['test'],
};

const BY_SPELLING = new Map<string, Split>(SPLITS.flatMap((s) => SPLIT_SPELLINGS[s].map((w) => [w, s] as const)));

/**
 * Normalises a split value (case and surrounding space ignored); null for an unknown value.
 * @example
 * normalizeSplit(' Validation '); // => 'dev'
 */
export function normalizeSplit(raw: string): Split | null {
  return BY_SPELLING.get(raw.trim().toLowerCase()) ?? null;
}

/** The accepted spellings, for messages. */
export const SPLIT_HELP = SPLITS.map((s) => {
  const others = SPLIT_SPELLINGS[s].filter((w) => w !== s);
  return others.length ? `${s} (${others.join(', ')})` : s;
}).join(', ');
