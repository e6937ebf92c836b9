// Progress on stderr for long runs: a single self-overwriting line on a terminal, nothing
// when stderr is not a terminal or --quiet is given, or one JSON object per line with
// --json-progress (for scripts). The solver core only calls its observer; what it shows
// is decided here.

export interface ProgressFields {
  stage: string;
  sweep: number;
  residual: number;
  errorEstimate?: number;
  atoms?: number;
  mu?: number;
  /** 0..1 if the stage knows its fraction done */
  fraction?: number;
  detail?: string;
}

export interface ProgressReporter {
  update(fields: ProgressFields): void;
  done(message?: string): void;
}

export type ProgressStyle = 'auto' | 'quiet' | 'json';

function formatNumber(x: number | undefined, digits = 3): string {
  if (x === undefined || !Number.isFinite(x)) return '-';
  return Math.abs(x) >= 1e4 || (Math.abs(x) < 1e-2 && x !== 0) ? x.toExponential(digits - 1) : x.toPrecision(digits);
}

export function createProgressReporter(style: ProgressStyle, stream: NodeJS.WriteStream = process.stderr): ProgressReporter {
  const start = Date.now();
  if (style === 'json') {
    return {
      update(fields) {
        stream.write(`${JSON.stringify({ ...fields, elapsedSeconds: (Date.now() - start) / 1000 })}\n`);
      },
      done(message) {
        stream.write(`${JSON.stringify({ stage: 'done', message: message ?? '', elapsedSeconds: (Date.now() - start) / 1000 })}\n`);
      },
    };
  }
  if (style === 'quiet' || !stream.isTTY) return { update() {}, done() {} };
  let last = 0;
  let firstResidual = NaN;
  let drawn = false;
  return {
    update(fields) {
      const now = Date.now();
      if (now - last < 100) return;
      last = now;
      if (!(firstResidual > 0) && fields.residual > 0) firstResidual = fields.residual;
      const elapsed = (now - start) / 1000;
      let eta = '';
      if (fields.fraction !== undefined && fields.fraction > 0.02) {
        eta = ` ~${Math.max(0, (elapsed * (1 - fields.fraction)) / fields.fraction).toFixed(0)} s left`;
      }
      const parts = [
        `${fields.stage}`,
        `sweep ${fields.sweep}`,
        `max|dphi| ${formatNumber(fields.residual)}`,
        fields.errorEstimate !== undefined ? `err~${formatNumber(fields.errorEstimate)}` : '',
        fields.atoms !== undefined && Number.isFinite(fields.atoms) ? `N ${formatNumber(fields.atoms, 6)}` : '',
        fields.mu !== undefined ? `mu ${formatNumber(fields.mu, 5)}` : '',
        fields.detail ?? '',
        `${elapsed.toFixed(1)} s${eta}`,
      ].filter((p) => p.length > 0);
      const line = parts.join('  ');
      const width = stream.columns ?? 100;
      stream.write(`\r${line.slice(0, width - 1).padEnd(Math.min(width - 1, line.length + 5))}`);
      drawn = true;
    },
    done(message) {
      if (drawn) stream.write('\r\x1b[K');
      if (message) stream.write(`${message}\n`);
    },
  };
}

/** The reporter a command's --quiet / --json-progress options ask for. */
export function progressFor(options: { quiet?: boolean; jsonProgress?: boolean }): ProgressReporter {
  return createProgressReporter(options.quiet ? 'quiet' : options.jsonProgress ? 'json' : 'auto');
}

/**
 * A solver observer that shows the progress of a lattice run and stops it when
 * `interrupted()` turns true. The remaining time of a relaxation comes from the
 * contraction rate: the error shrinks by r per sweep, so about ln(tol/err)/ln(r) sweeps remain.
 */
export function solveObserver(
  progress: ProgressReporter,
  tolerance: number,
  interrupted: () => boolean,
): (p: { stage: string; totalSweeps: number; change: number; rate: number; errorEstimate: number; atoms: number; mu: number; nmax: number }) => 'stop' | undefined {
  let lastTick = Date.now();
  let lastSweeps = 0;
  return (p) => {
    const now = Date.now();
    const sweepSeconds = (now - lastTick) / 1000 / Math.max(1, p.totalSweeps - lastSweeps);
    lastTick = now;
    lastSweeps = p.totalSweeps;
    let eta = '';
    if (p.rate > 0 && p.rate < 1 && p.errorEstimate > tolerance && Number.isFinite(p.errorEstimate)) {
      const remaining = Math.log(tolerance / p.errorEstimate) / Math.log(p.rate);
      eta = `, ~${Math.ceil(remaining * sweepSeconds)} s to converge at this mu`;
    }
    progress.update({
      stage: p.stage === 'solve' ? 'solving' : p.stage === 'temperature' ? 'finding T' : 'dn/dmu',
      sweep: p.totalSweeps,
      residual: p.change,
      errorEstimate: p.errorEstimate,
      atoms: p.atoms,
      mu: p.mu,
      detail: `nmax ${p.nmax}${eta}`,
    });
    return interrupted() ? 'stop' : undefined;
  };
}
