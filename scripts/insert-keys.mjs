// Replaces the scenario reference between the keys markers of README.md with the output of
// `tiercake keys` (the table generated from the zod schema).
import { readFileSync, writeFileSync } from 'node:fs';
const [table, readme] = process.argv.slice(2);
const text = readFileSync(readme, 'utf8');
const start = '<!-- keys:start -->';
const end = '<!-- keys:end -->';
const a = text.indexOf(start);
const b = text.indexOf(end);
if (a < 0 || b < a) throw new Error(`${readme}: keys markers not found`);
writeFileSync(readme, `${text.slice(0, a + start.length)}\n${readFileSync(table, 'utf8')}${text.slice(b)}`);
