// Node module hooks: resolve './x.js' imported from a .ts file to './x.ts' when it exists,
// and strip types from .ts files with vite's oxc transform (a dependency we already have).
import { existsSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import { transformWithOxc } from 'vite';

export async function resolve(specifier, context, nextResolve) {
  if (context.parentURL?.endsWith('.ts') && specifier.startsWith('.') && specifier.endsWith('.js')) {
    const tsUrl = new URL(specifier.slice(0, -3) + '.ts', context.parentURL);
    if (existsSync(fileURLToPath(tsUrl))) return { url: tsUrl.href, shortCircuit: true };
  }
  return nextResolve(specifier, context);
}

export async function load(url, context, nextLoad) {
  if (url.endsWith('.ts')) {
    const file = fileURLToPath(url);
    const src = await readFile(file, 'utf8');
    const { code, map } = await transformWithOxc(src, file, { sourcemap: true });
    const inline = `\n//# sourceMappingURL=data:application/json;base64,${Buffer.from(JSON.stringify(map)).toString('base64')}`;
    return { format: 'module', source: code + inline, shortCircuit: true };
  }
  return nextLoad(url, context);
}
