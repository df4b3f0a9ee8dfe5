import { openDuck } from './dist/engine/duck.js';
import { detectTable, tableSql } from './dist/io/read-table.js';
const duck = await openDuck({});
for (const f of process.argv.slice(2)) {
  try { const t = await detectTable(f); const sql = await tableSql(duck, t); await duck.all(`SELECT count(*) FROM ${sql}`); console.log('OK', f, sql); }
  catch (e) { console.log('---', f, '\n', e.message.split('\n').slice(0,6).join('\n'), '\n cause:', e.cause?.message?.split('\n').slice(0,8).join('\n')); }
}
