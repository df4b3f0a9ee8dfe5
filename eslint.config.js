// The lint step of `npm test` (see DEVELOPERS.md, "Layers"): typescript-eslint's recommended rules,
// react-hooks for the explorer, no import cycles, and the layer rule: a folder of src/ imports only
// from the folders before it in LAYERS (type imports too). Data flows one way, read → cells → slices →
// triage → render, and only cli/ touches the process.
import tseslint from 'typescript-eslint';
import importX from 'eslint-plugin-import-x';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';
import reactHooks from 'eslint-plugin-react-hooks';

/** The folders of src/, bottom up: each may import only from those before it. */
export const LAYERS = [
  'core', // types and rules every layer shares: splits, cells, errors, unsafe characters
  'stats', // pure statistics, one method per file
  'sql', // the engine connection, quoting, dialects, the checked --where, query progress
  'output', // atomic writes, temporary files, export files
  'terminal', // sanitising, display width, wrapping, colours
  'read', // format detection, table SQL, the rows view, roles, read errors, project file, keyed tables
  'cells', // rows → cells: row status, profile, plan, the cell query, cells files, warehouse, cache, load
  'slices', // cells → slices: the arquero roll-up
  'triage', // slices + floors + costs → the report; pure
  'discover', // the search over conjunctions of conditions for discovered slices; pure
  'compare', // two reports of the same slices → the change of each measure, paired where rows pair; pure
  'rows', // SQL over rows behind slices: export, examples, paired rows
  'render', // text, markdown, csv, json, junit
  'tui', // the explorer's screens, components, hooks and state
  'app', // the analysis a command or the explorer runs
  'demo', // the invented solder-joint inspection line
  'cli', // yargs commands; the only layer that touches process
];

const zones = LAYERS.flatMap((layer, i) =>
  LAYERS.slice(i + 1).map((above) => ({
    target: `./src/${layer}`,
    from: `./src/${above}`,
    message: `${layer}/ may import only from ${LAYERS.slice(0, i).join(', ') || 'nothing in src'} (layers: eslint.config.js)`,
  })),
);

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'coverage/**', 'test/fixtures/**'] },
  {
    files: ['src/**/*.ts', 'src/**/*.tsx', 'bench/**/*.ts', 'bench/**/*.tsx'],
    extends: [...tseslint.configs.recommended],
    plugins: { 'import-x': importX },
    settings: {
      // import-x parses every module it follows (for cycles) with the TypeScript parser
      'import-x/extensions': ['.ts', '.tsx', '.js'],
      'import-x/parsers': { '@typescript-eslint/parser': ['.ts', '.tsx'] },
      'import-x/resolver-next': [createTypeScriptImportResolver({ project: './tsconfig.json' })],
    },
    rules: {
      'import-x/no-cycle': ['error', { ignoreExternal: true }],
      'import-x/no-restricted-paths': ['error', { zones }],
      // the entry file (src/cli.ts) is the cli layer too
      'no-restricted-imports': 'off',
    },
  },
  {
    files: ['src/tui/**/*.ts', 'src/tui/**/*.tsx', 'src/cli/commands/*.tsx'],
    plugins: { 'react-hooks': reactHooks },
    rules: reactHooks.configs.recommended.rules,
  },
);
