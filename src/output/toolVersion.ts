// The tool version, read once from package.json next to the compiled sources.
import { readFileSync } from 'node:fs';

let cached: string | null = null;

export function toolVersion(): string {
  if (cached !== null) return cached;
  try {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    cached = pkg.version ?? '0.0.0';
  } catch {
    cached = '0.0.0';
  }
  return cached;
}
