/**
 * The lint step holds the layer rule and forbids import cycles (eslint.config.js): an upward import or
 * a cycle written into a real module is reported. The lint itself runs in `npm test` (pretest), over
 * every file of src/ and bench/.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { ESLint } from 'eslint';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/run-cli.js';

const eslint = new ESLint({ cwd: ROOT });

async function problems(file: string, text: string): Promise<string[]> {
  const [result] = await eslint.lintText(text, { filePath: `${ROOT}/${file}` });
  return result.messages.map((m) => `${m.ruleId}: ${m.message}`);
}

describe('the layer rule and import cycles', () => {
  it('every folder of src/ is a layer, and every layer a folder', async () => {
    const config = '../../eslint.config.js'; // plain JavaScript, without types
    const { LAYERS } = (await import(config)) as { LAYERS: string[] };
    const folders = readdirSync(`${ROOT}/src`, { withFileTypes: true }).filter((e) => e.isDirectory()).map((e) => e.name);
    expect([...folders].sort()).toEqual([...LAYERS].sort());
  });

  it('src/ as it is passes', async () => {
    const file = 'src/read/source.ts';
    expect(await problems(file, readFileSync(`${ROOT}/${file}`, 'utf8'))).toEqual([]);
  }, 60_000);

  it('an upward import is an error naming the layers', async () => {
    const text = `import { VERSION } from '../core/version.js';\nimport { main } from '../cli/index.js';\nexport const x = [VERSION, main];\n`;
    const found = await problems('src/core/probe.ts', text);
    expect(found).toContainEqual(expect.stringMatching(/^import-x\/no-restricted-paths: .*core\/ may import only from nothing in src \(layers: eslint\.config\.js\)/));
  }, 60_000);

  it('a cycle is an error: read/source.ts importing the load step that imports it', async () => {
    const file = 'src/read/source.ts';
    const text = `import { loadCells } from '../cells/load.js';\nexport const probe = loadCells;\n` + readFileSync(`${ROOT}/${file}`, 'utf8');
    const found = await problems(file, text);
    expect(found).toContainEqual(expect.stringMatching(/^import-x\/no-cycle: /));
    expect(found).toContainEqual(expect.stringMatching(/^import-x\/no-restricted-paths: .*read\/ may import only from core, stats, sql, output, terminal/));
  }, 60_000);
});
