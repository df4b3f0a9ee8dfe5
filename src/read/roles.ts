import { error } from '../core/errors.js';

/** The role a column can play. Every other column is metadata and may become a slice column. */
export type Role = 'label' | 'pred' | 'error' | 'split' | 'id' | 'score' | 'weight' | 'run';

/** Column names chosen by the user (flags or floorgap.json); undefined means "detect". */
export type RoleOptions = Partial<Record<Role, string>>;

/** Resolved roles: the column playing each role, or null. */
export interface Roles {
  readonly label: string | null;
  readonly pred: string | null;
  /** a 0/1 error column, or a 0/1 `correct` column when `errorIsCorrect` */
  readonly error: string | null;
  readonly errorIsCorrect: boolean;
  readonly split: string | null;
  readonly id: string | null;
  readonly score: string | null;
  readonly weight: string | null;
  /** the training run a row belongs to, for tables that hold several runs; never a slice column */
  readonly run: string | null;
}

const COMMON_NAMES: Record<Role, readonly string[]> = {
  label: ['label', 'y_true', 'target', 'truth'],
  pred: ['pred', 'prediction', 'y_pred', 'predicted'],
  error: ['error', 'is_error'],
  split: ['split'],
  id: ['id', 'row_id', 'example_id'],
  score: ['score', 'confidence'],
  weight: ['weight', 'sample_weight'],
  run: ['run'],
};
const CORRECT_NAMES = ['correct', 'is_correct'];

function find(columns: readonly string[], names: readonly string[]): string | null {
  for (const name of names) {
    const hit = columns.find((c) => c.trim().toLowerCase() === name);
    if (hit !== undefined) return hit;
  }
  return null;
}

function listColumns(columns: readonly string[]): string {
  return columns.map((c) => JSON.stringify(c)).join(', ');
}

/**
 * Assigns columns to roles: each explicit choice must exist; the rest are detected from common names.
 * The error of a row is `label ≠ pred` (trimmed strings), or a 0/1 `error` column (or `correct`, inverted).
 * @param where the file(s) the columns came from, for messages
 * @param perSplitFiles true when the split comes from `--train F`, `--dev F`, …
 */
export function resolveRoles(
  columns: readonly string[],
  chosen: RoleOptions,
  where: string,
  perSplitFiles: boolean,
): Roles {
  const pick = (role: Role): string | null => {
    const name = chosen[role];
    if (name !== undefined && name !== '') {
      if (!columns.includes(name)) {
        throw error(`${where}: no column "${name}" for --${role}; the columns are ${listColumns(columns)}`);
      }
      return name;
    }
    return null;
  };
  const label = pick('label');
  const pred = pick('pred');
  let errorCol = pick('error');
  let errorIsCorrect = false;
  let resolvedLabel = label;
  let resolvedPred = pred;
  if (errorCol === null && (label === null || pred === null)) {
    resolvedLabel = label ?? find(columns, COMMON_NAMES.label);
    resolvedPred = pred ?? find(columns, COMMON_NAMES.pred);
    if (resolvedLabel === null || resolvedPred === null) {
      errorCol = find(columns, COMMON_NAMES.error);
      if (errorCol === null) {
        errorCol = find(columns, CORRECT_NAMES);
        errorIsCorrect = errorCol !== null;
      }
      if (errorCol === null) {
        const missing = resolvedLabel === null ? 'label' : 'pred';
        throw error(
          `${where}: no ${missing} column; the columns are ${listColumns(columns)}; name the true and predicted class with --label and --pred, or a 0/1 column with --error`,
        );
      }
      // label alone is still useful as a slice column (per-class view)
      resolvedPred = null;
    }
  }
  const split = perSplitFiles ? null : pick('split') ?? find(columns, COMMON_NAMES.split);
  if (!perSplitFiles && split === null) {
    throw error(
      `${where}: no split column; the columns are ${listColumns(columns)}; name it with --split, or give one file per split with --train/--dev`,
    );
  }
  const optional = (role: Role) => pick(role) ?? find(columns, COMMON_NAMES[role]);
  const roles: Roles = {
    label: resolvedLabel,
    pred: errorCol === null ? resolvedPred : null,
    error: errorCol,
    errorIsCorrect,
    split,
    id: optional('id'),
    score: optional('score'),
    weight: optional('weight'),
    run: optional('run'),
  };
  const used = new Map<string, string>();
  for (const role of ['label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run'] as const) {
    const col = roles[role];
    if (col === null) continue;
    const other = used.get(col);
    if (other !== undefined) throw error(`${where}: column "${col}" cannot be both ${other} and ${role}`);
    used.set(col, role);
  }
  return roles;
}

/** The columns that play a role (never candidate slice columns, except label and pred via `--by`). */
export function roleColumns(roles: Roles): string[] {
  return [roles.label, roles.pred, roles.error, roles.split, roles.id, roles.score, roles.weight, roles.run].filter(
    (c): c is string => c !== null,
  );
}
