/** Roles. Expected values are hand-counted from the fixture: the column lists given to resolveRoles. */
import { describe, expect, it } from 'vitest';
import { resolveRoles, roleColumns, type Roles } from '../../src/read/roles.js';
import { normalizeSplit, SPLIT_HELP } from '../../src/core/split.js';
import { FloorgapError } from '../../src/core/errors.js';

function thrown(f: () => unknown): FloorgapError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(FloorgapError);
    return e as FloorgapError;
  }
  throw new Error('expected an error');
}

const NONE: Roles = {
  run: null,
  label: null,
  pred: null,
  error: null,
  errorIsCorrect: false,
  split: null,
  id: null,
  score: null,
  weight: null,
};

describe('resolveRoles: detection from common names', () => {
  it('label, pred, split, id, score, weight', () => {
    const cols = ['id', 'split', 'label', 'pred', 'score', 'weight', 'station'];
    expect(resolveRoles(cols, {}, 'p.csv', false)).toEqual({
      ...NONE,
      label: 'label',
      pred: 'pred',
      split: 'split',
      id: 'id',
      score: 'score',
      weight: 'weight',
    });
  });

  it('other common spellings, any case and surrounding space', () => {
    const cols = ['Example_ID', ' Y_True ', 'PREDICTION', 'Split', 'confidence', 'sample_weight'];
    expect(resolveRoles(cols, {}, 'p.csv', false)).toEqual({
      ...NONE,
      label: ' Y_True ',
      pred: 'PREDICTION',
      split: 'Split',
      id: 'Example_ID',
      score: 'confidence',
      weight: 'sample_weight',
    });
  });

  it('earlier names in the list win: label before target, pred before predicted', () => {
    const cols = ['target', 'label', 'predicted', 'pred', 'split'];
    const r = resolveRoles(cols, {}, 'p.csv', false);
    expect(r.label).toBe('label');
    expect(r.pred).toBe('pred');
  });

  it('truth and y_pred', () => {
    const r = resolveRoles(['truth', 'y_pred', 'split'], {}, 'p.csv', false);
    expect([r.label, r.pred]).toEqual(['truth', 'y_pred']);
  });

  it('roleColumns lists the columns that play a role, in role order', () => {
    const r = resolveRoles(['station', 'weight', 'pred', 'label', 'split'], {}, 'p.csv', false);
    expect(roleColumns(r)).toEqual(['label', 'pred', 'split', 'weight']);
  });
});

describe('resolveRoles: explicit names', () => {
  it('explicit names win over common names', () => {
    const cols = ['label', 'pred', 'truth', 'guess', 'split', 'fold', 'w'];
    const r = resolveRoles(cols, { label: 'truth', pred: 'guess', split: 'fold', weight: 'w' }, 'p.csv', false);
    expect(r).toEqual({ ...NONE, label: 'truth', pred: 'guess', split: 'fold', weight: 'w' });
  });

  it('an explicit name that is not a column lists the columns', () => {
    const e = thrown(() => resolveRoles(['a', 'b', 'split'], { label: 'truth' }, 'p.csv', false));
    expect(e.message).toBe('p.csv: no column "truth" for --label; the columns are "a", "b", "split"');
  });

  it('an explicit name is matched exactly (case matters)', () => {
    const e = thrown(() => resolveRoles(['Truth', 'pred', 'split'], { label: 'truth' }, 'p.csv', false));
    expect(e.message).toBe('p.csv: no column "truth" for --label; the columns are "Truth", "pred", "split"');
  });

  it('an empty explicit name means detect', () => {
    expect(resolveRoles(['label', 'pred', 'split'], { label: '' }, 'p.csv', false).label).toBe('label');
  });

  it('one column in two roles', () => {
    const e = thrown(() => resolveRoles(['label', 'pred', 'split'], { weight: 'label' }, 'p.csv', false));
    expect(e.message).toBe('p.csv: column "label" cannot be both label and weight');
  });
});

describe('resolveRoles: missing label or pred', () => {
  it('no label column: a clear error listing the columns', () => {
    const e = thrown(() => resolveRoles(['id', 'split', 'pred', 'station'], {}, 'preds.csv', false));
    expect(e.message).toBe(
      'preds.csv: no label column; the columns are "id", "split", "pred", "station"; name the true and predicted class with --label and --pred, or a 0/1 column with --error',
    );
    expect(e.exitCode).toBe(2);
  });

  it('no pred column', () => {
    const e = thrown(() => resolveRoles(['split', 'label'], {}, 'preds.csv', false));
    expect(e.message).toBe(
      'preds.csv: no pred column; the columns are "split", "label"; name the true and predicted class with --label and --pred, or a 0/1 column with --error',
    );
  });
});

describe('resolveRoles: error and correct columns', () => {
  it('an error column when there is no pred; label stays for the per-class view', () => {
    const r = resolveRoles(['split', 'label', 'error'], {}, 'p.csv', false);
    expect(r).toEqual({ ...NONE, label: 'label', split: 'split', error: 'error' });
  });

  it('is_error with neither label nor pred', () => {
    const r = resolveRoles(['split', 'is_error'], {}, 'p.csv', false);
    expect(r).toEqual({ ...NONE, split: 'split', error: 'is_error' });
  });

  it('a correct column is an inverted error column', () => {
    const r = resolveRoles(['split', 'Correct'], {}, 'p.csv', false);
    expect(r).toEqual({ ...NONE, split: 'split', error: 'Correct', errorIsCorrect: true });
    expect(resolveRoles(['split', 'is_correct'], {}, 'p.csv', false).errorIsCorrect).toBe(true);
  });

  it('an explicit --error wins over label and pred; pred is then not a role', () => {
    const r = resolveRoles(['split', 'label', 'pred', 'wrong'], { error: 'wrong' }, 'p.csv', false);
    expect(r.error).toBe('wrong');
    expect(r.errorIsCorrect).toBe(false);
    expect(r.pred).toBeNull();
  });

  it('label and pred present: an error column is not used', () => {
    const r = resolveRoles(['split', 'label', 'pred', 'error'], {}, 'p.csv', false);
    expect([r.label, r.pred, r.error]).toEqual(['label', 'pred', null]);
  });
});

describe('resolveRoles: split', () => {
  it('no split column and no per-split files', () => {
    const e = thrown(() => resolveRoles(['label', 'pred', 'fold'], {}, 'p.csv', false));
    expect(e.message).toBe(
      'p.csv: no split column; the columns are "label", "pred", "fold"; name it with --split, or give one file per split with --train/--dev',
    );
  });

  it('per-split files: no split role, even when a split column exists', () => {
    expect(resolveRoles(['label', 'pred'], {}, 'a.csv, b.csv', true).split).toBeNull();
    expect(resolveRoles(['label', 'pred', 'split'], {}, 'a.csv, b.csv', true).split).toBeNull();
  });
});

describe('normalizeSplit', () => {
  // expected: the accepted spellings of "split" in the project glossary
  const cases: [string, string | null][] = [
    ['train', 'train'],
    [' Train ', 'train'],
    ['train_dev', 'train_dev'],
    ['train-dev', 'train_dev'],
    ['TrainDev', 'train_dev'],
    ['traindev', 'train_dev'],
    ['dev', 'dev'],
    ['val', 'dev'],
    ['VALID', 'dev'],
    ['validation', 'dev'],
    ['test', 'test'],
    ['\tTEST\n', 'test'],
    ['holdout', null],
    ['train dev', null],
    ['', null],
  ];
  for (const [raw, want] of cases) {
    it(`${JSON.stringify(raw)} → ${want}`, () => expect(normalizeSplit(raw)).toBe(want));
  }

  it('the help text names every spelling', () => {
    expect(SPLIT_HELP).toBe('train, train_dev (train-dev, traindev), dev (val, valid, validation), test');
  });
});
