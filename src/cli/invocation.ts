// How the user started tiercake, so that the commands it prints as hints (continue with,
// merge when done, ...) work when pasted: `tiercake` only when the program was started
// through a `tiercake` on PATH (npm link, a global install, npx); otherwise `node` with the
// path of the entry script relative to the folder the user is in. Under `npm run` the
// user's folder is INIT_CWD (npm sets it to where npm was started; the script itself runs
// in the package folder).

import { basename, delimiter, dirname, isAbsolute, relative, resolve } from 'node:path';
import { realpathSync } from 'node:fs';

export interface InvocationContext {
  /** process.argv[1]: the script node ran */
  script: string;
  /** process.env */
  env: Readonly<Record<string, string | undefined>>;
  /** process.cwd() */
  cwd: string;
}

function safeRealpath(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    return path;
  }
}

function quoteIfNeeded(text: string): string {
  return /^[A-Za-z0-9_./:@%+=,-]+$/.test(text) ? text : `'${text.replace(/'/g, "'\\''")}'`;
}

/** The command to print in hints, e.g. 'tiercake' or 'node dist/main.js'. */
export function commandPrefix(context: InvocationContext = { script: process.argv[1] ?? '', env: process.env, cwd: process.cwd() }): string {
  const { script, env } = context;
  if (basename(script) === 'tiercake') {
    // Started through a link named tiercake: the name works if that folder is on PATH.
    const folder = safeRealpath(dirname(resolve(context.cwd, script)));
    const onPath = (env.PATH ?? '').split(delimiter).some((p) => p.length > 0 && safeRealpath(p) === folder);
    if (onPath) return 'tiercake';
  }
  const userFolder = env.INIT_CWD !== undefined && isAbsolute(env.INIT_CWD) ? env.INIT_CWD : context.cwd;
  const absolute = resolve(context.cwd, script);
  const shown = relative(userFolder, absolute);
  const path = shown.length > 0 && !shown.startsWith('..') && !isAbsolute(shown) ? shown : absolute;
  return `node ${quoteIfNeeded(path)}`;
}
