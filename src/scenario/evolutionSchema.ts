// Scenario key `evolution` (issue 18): what `tiercake evolve` does after it has found the
// ground state of the scenario. The time-dependent Gutzwiller equations run from that state
// under ramps of scenario parameters, an optional lattice modulation and an optional
// modulation spectrum; see src/pipeline/evolutionPlan.ts for how the keys become drives.
//
// Units that cannot be misread:
// - times (duration, outputEvery, ramp point times, modulation start/end, snapshot times):
//   hbar/E for the scenario's energy unit E in dimensionless mode (E = J or U of the static
//   scenario: with energyUnit U, t = 1 is hbar/U and h/U is 2 pi), milliseconds in
//   laboratory mode;
// - ramp values: the unit of the key they drive (the energy unit for energies, E_r for
//   laboratory.depthEr, Hz for trap.frequencyHz, sites for trap.centreSites); energies keep
//   the meaning of the static scenario (with energyUnit J, a hopping of 0.5 is half the
//   static J);
// - modulation frequencies: as an energy h f in the energy unit (laboratory mode: Hz with
//   the default energyUnit), so that "frequency = U" reads as it does in the lab.
//
// The chemical potential and the atom number cannot be ramped: the evolution is a closed
// system and conserves N; the temperature cannot either (the start is the T = 0 ground state).

import * as z from 'zod';

const positive = (): z.ZodNumber => z.number().positive();
const time = (): z.ZodNumber => z.number().min(0);
/** Keys an amplitude modulation may drive: the `modulation` of an evolution and its `spectrum`. */
const modulatedKey = z.enum(['laboratory.depthEr', 'hubbard.hopping', 'hubbard.interaction']);

/** Ramp segment shapes (src/dynamics/rampSchedule.ts). */
export const rampShapes = ['linear', 'exponential', 's-curve'] as const;

export const RampSchema = z
  .strictObject({
    path: z
      .string()
      .min(1)
      .max(200)
      .describe(
        'scenario key the ramp drives, dotted as in --set (list entries by index): hubbard.hopping, hubbard.interaction, laboratory.depthEr, ' +
          'trap.coefficient, trap.frequencyHz, trap.centreSites (each also per axis, e.g. laboratory.depthEr.0), disorder.width, ' +
          'disorder.meanStrength, landscape.<k>.<amplitude> (wallHeight, perSite, perUm, accelerationMPerS2, energyPerLevel, depth, depthEr)',
      ),
    points: z
      .array(z.array(z.number()).length(2))
      .min(1)
      .max(10_000)
      .describe(
        '[time, value] pairs: time in hbar/E (ms in laboratory mode), non-decreasing (two equal times make a jump); value in the unit of the key ' +
          '(energy unit, E_r, Hz, sites); before the first point the value is the first value, after the last the last value; a first value other than the static one is a quench at t = 0',
      ),
    shape: z
      .enum(rampShapes)
      .default('linear')
      .describe("segments between points: 'linear', 'exponential' (geometric, values of one sign) or 's-curve' (smoothstep, no kinks)"),
  })
  .describe('piecewise ramp of one scenario parameter');

export const ModulationSchema = z
  .strictObject({
    path: modulatedKey
      .optional()
      .describe('what is modulated: the lattice depth (laboratory mode, the default there; J and U follow the band structure) or J or U (default in hubbard mode: hubbard.hopping)'),
    relativeAmplitude: z.number().min(0).lt(1).describe('A in value(t) = value (1 + A sin(2 pi f (t - start)))'),
    frequency: positive().describe('h f in the energy unit (laboratory mode with energyUnit Hz: f in Hz)'),
    start: time().default(0).describe('modulation switched on at this time (hbar/E or ms)'),
    end: time().optional().describe('and off at this time (default: the end of the evolution)'),
  })
  .describe('amplitude modulation during the evolution, multiplying any ramp of the same key');

export const SpectrumSchema = z
  .strictObject({
    path: modulatedKey
      .optional()
      .describe('modulated key (default: laboratory.depthEr in laboratory mode, hubbard.hopping in hubbard mode)'),
    relativeAmplitude: z.number().gt(0).lt(1).default(0.1).describe('relative modulation amplitude A'),
    frequencies: z.array(positive()).min(1).max(2000).optional().describe('h f of every point, in the energy unit (or give from, to and count)'),
    from: positive().optional().describe('first h f, in the energy unit'),
    to: positive().optional().describe('last h f, in the energy unit'),
    count: z.int().min(1).max(2000).optional().describe('number of frequencies from `from` to `to`, evenly spaced'),
    duration: positive().optional().describe('modulation time per frequency, hbar/E or ms (default: 10 h/U)'),
  })
  .describe(
    'modulation spectrum of the cloud at the end of the evolution: for every frequency the same state is modulated and the energy absorbed and doublons created are recorded (also: --modulation-frequencies)',
  );

export const IntegratorSchema = z
  .strictObject({
    kind: z
      .enum(['dormand-prince', 'splitting'])
      .default('dormand-prince')
      .describe("'dormand-prince': adaptive Runge-Kutta 5(4) with error control; 'splitting': red-black splitting with exact site exponentials (norm-preserving, fixed step)"),
    absoluteTolerance: positive().max(1e-2).default(1e-9).describe('dormand-prince: absolute error per amplitude and step'),
    relativeTolerance: z.number().min(0).max(1e-2).default(1e-9).describe('dormand-prince: relative error per amplitude and step'),
    maxStep: positive().optional().describe('dormand-prince: longest step, hbar/E or ms'),
    maxSteps: z.int().min(1).max(1e9).default(50_000_000).describe('dormand-prince: steps allowed in the whole run'),
    step: positive().optional().describe('splitting: step, hbar/E or ms (required for splitting)'),
    order: z.union([z.literal(2), z.literal(4)]).default(4).describe('splitting: 2 (Strang) or 4 (Suzuki composition of five Strang steps)'),
  })
  .describe('time integrator');

export const SnapshotsSchema = z
  .strictObject({
    times: z.array(time()).min(1).max(200).optional().describe('times of the field snapshots and camera pictures (default: evenly spaced, see count)'),
    count: z.int().min(1).max(200).default(3).describe('without times: this many snapshots from t = 0 to the end (start and end included)'),
  })
  .describe('per-site fields (.npy) and pictures at chosen times');

export const VerdictSchema = z
  .strictObject({
    excessEnergyPerAtomU: z
      .number()
      .min(0)
      .default(0.01)
      .describe('largest excess energy per atom over the final ground state still called adiabatic, in units of the final U (a choice, not a law)'),
    excessDefectsPerSite: z
      .number()
      .min(0)
      .default(0.02)
      .describe('largest excess defect probability per site of any Mott shell of the final ground state still called adiabatic'),
  })
  .describe('thresholds of the adiabaticity verdict');

export const EvolutionSchema = z
  .strictObject({
    duration: time().describe('length of the evolution from t = 0: hbar/E for the energy unit E (dimensionless mode), ms (laboratory mode)'),
    outputEvery: positive().optional().describe('interval between rows of evolution.csv, hbar/E or ms (default: duration / 100)'),
    outputTimes: z.array(time()).min(1).max(100_000).optional().describe('or: explicit output times, ascending, hbar/E or ms'),
    ramps: z.array(RampSchema).max(32).default([]).describe('piecewise ramps of scenario parameters; parameters without a ramp keep their static values'),
    modulation: ModulationSchema.optional(),
    spectrum: SpectrumSchema.optional(),
    integrator: IntegratorSchema.prefault({}),
    snapshots: SnapshotsSchema.prefault({}),
    animationFrames: z.int().min(0).max(120).default(24).describe('frames of the animation in the report (at evenly spaced output times); 0 for none'),
    verdict: VerdictSchema.prefault({}),
  })
  .describe('time evolution for `tiercake evolve` (ignored by the other commands)');

export type EvolutionSettings = z.output<typeof EvolutionSchema>;
export type RampSettings = z.output<typeof RampSchema>;
export type SpectrumSettings = z.output<typeof SpectrumSchema>;

/** The keys a ramp may drive, as written (per-axis forms take a trailing index). */
export const RAMP_KEYS_HUBBARD = ['hubbard.hopping', 'hubbard.interaction', 'trap.coefficient', 'trap.centreSites', 'disorder.width', 'disorder.meanStrength'] as const;
export const RAMP_KEYS_LABORATORY = ['laboratory.depthEr', 'trap.frequencyHz', 'trap.centreSites', 'disorder.width', 'disorder.meanStrength'] as const;
/** Landscape amplitudes that scale their term's site energies linearly. */
export const LANDSCAPE_AMPLITUDES: Record<string, readonly string[]> = {
  gradient: ['perSite', 'perUm', 'accelerationMPerS2'],
  box: ['wallHeight'],
  image: ['energyPerLevel'],
  superlattice: ['depth', 'depthEr'],
};

/** Keys that can never be ramped, with the reason. */
const NOT_RAMPABLE: Array<[RegExp, string]> = [
  [/^particles\./, 'a closed system conserves N (mu is only a phase); ramp the trap or the lattice'],
  [/^temperature\./, 'the evolution starts from the T = 0 ground state and keeps a pure product state; temperature cannot be ramped'],
  [/^truncation\.|^solver\.|^phases\.|^profiles\.|^camera\.|^timeOfFlight\.|^lattice\.|^evolution\./, 'not a parameter of the Hamiltonian'],
];

interface EvolutionContext {
  dims: number;
  laboratory: boolean;
  /** the static values the scenario has at these keys exist (for trap.*, disorder.*) */
  has: (key: string) => boolean;
  /** the scenario's landscape term kinds, and whether a superlattice is "combined" */
  landscape: ReadonlyArray<{ kind: string; combined: boolean; present: (key: string) => boolean }>;
}

/** Parsed ramp path: a key and an optional axis (or term) index. */
export interface RampTarget {
  key: string;
  axis: number | null;
  /** landscape.<k>.<amplitude>: the term index */
  term: number | null;
}

/** 'laboratory.depthEr.1' -> { key: 'laboratory.depthEr', axis: 1 }; landscape.2.wallHeight -> term 2. */
export function parseRampPath(path: string): RampTarget {
  const parts = path.split('.');
  if (parts[0] === 'landscape' && parts.length === 3 && /^\d+$/.test(parts[1])) {
    return { key: `landscape.${parts[2]}`, axis: null, term: Number(parts[1]) };
  }
  const last = parts[parts.length - 1];
  if (parts.length >= 3 && /^\d+$/.test(last)) return { key: parts.slice(0, -1).join('.'), axis: Number(last), term: null };
  return { key: path, axis: null, term: null };
}

const PER_AXIS = new Set(['hubbard.hopping', 'laboratory.depthEr', 'trap.coefficient', 'trap.frequencyHz', 'trap.centreSites']);

/** Why a ramp path is refused, or null when it is one we can drive. */
function rampPathProblem(path: string, ctx: EvolutionContext): string | null {
  for (const [pattern, reason] of NOT_RAMPABLE) if (pattern.test(path)) return `${path} cannot be ramped: ${reason}`;
  const target = parseRampPath(path);
  if (target.term !== null) {
    const term = ctx.landscape[target.term];
    if (!term) return `the scenario has ${ctx.landscape.length} landscape term${ctx.landscape.length === 1 ? '' : 's'}; landscape.${target.term} does not exist`;
    const amplitude = target.key.slice('landscape.'.length);
    const allowed = LANDSCAPE_AMPLITUDES[term.kind] ?? [];
    if (!allowed.includes(amplitude)) {
      return allowed.length === 0
        ? `a '${term.kind}' landscape term has no amplitude to ramp`
        : `a '${term.kind}' landscape term is ramped through ${allowed.join(' or ')}, not ${amplitude}`;
    }
    if (!term.present(amplitude)) return `landscape.${target.term} gives no ${amplitude}; ramp the amplitude key the term uses`;
    if (term.combined) return `landscape.${target.term} is a superlattice with tunnelling "combined": its J and U are not rescaled during a ramp; use tunnelling "unchanged"`;
    return null;
  }
  const keys: readonly string[] = ctx.laboratory ? RAMP_KEYS_LABORATORY : RAMP_KEYS_HUBBARD;
  if (!keys.includes(target.key)) {
    const other: readonly string[] = ctx.laboratory ? RAMP_KEYS_HUBBARD : RAMP_KEYS_LABORATORY;
    if (other.includes(target.key)) {
      return ctx.laboratory
        ? `${target.key} is a key of hubbard mode; in laboratory mode ramp laboratory.depthEr (J and U follow the band structure) or trap.frequencyHz`
        : `${target.key} needs laboratory mode; in hubbard mode ramp hubbard.hopping, hubbard.interaction or trap.coefficient`;
    }
    return `${path} is not a key a ramp can drive; use one of ${keys.join(', ')} (per axis with a trailing index), or landscape.<k>.<amplitude>`;
  }
  if (target.axis !== null) {
    if (!PER_AXIS.has(target.key)) return `${target.key} has no axes; write ${target.key} without an index`;
    if (target.axis >= ctx.dims) return `a ${ctx.dims}D lattice has axes 0 to ${ctx.dims - 1}, got ${target.axis}`;
  }
  if ((target.key === 'disorder.width' || target.key === 'disorder.meanStrength') && !ctx.has(target.key)) {
    return `the scenario has no ${target.key} (${target.key === 'disorder.width' ? 'box' : 'speckle'} disorder) to ramp`;
  }
  if ((target.key === 'trap.coefficient' || target.key === 'trap.frequencyHz') && !ctx.has('trap')) {
    return `the scenario has no trap section; give trap.${ctx.laboratory ? 'frequencyHz' : 'coefficient'} its static value first`;
  }
  return null;
}

/** Cross-field checks of the evolution section: [path, message] pairs for the scenario's superRefine. */
export function evolutionIssues(e: EvolutionSettings | undefined, ctx: EvolutionContext): Array<[PropertyKey[], string]> {
  const out: Array<[PropertyKey[], string]> = [];
  if (!e) return out;
  const at = (...rest: PropertyKey[]): PropertyKey[] => ['evolution', ...rest];
  if (e.outputEvery !== undefined && e.outputTimes !== undefined) out.push([at('outputEvery'), 'give outputEvery or outputTimes, not both']);
  if (e.outputTimes) {
    e.outputTimes.forEach((t, k) => {
      if (k > 0 && t <= e.outputTimes![k - 1]) out.push([at('outputTimes', k), `expected ascending times, got ${t} after ${e.outputTimes![k - 1]}`]);
      if (t > e.duration) out.push([at('outputTimes', k), `${t} lies after the end of the evolution (duration ${e.duration})`]);
    });
  }
  if (e.outputEvery !== undefined && e.duration > 0 && e.duration / e.outputEvery > 100_000) {
    out.push([at('outputEvery'), `gives ${Math.ceil(e.duration / e.outputEvery)} rows, more than 100000; choose a longer interval`]);
  }
  const driven: Array<{ family: string; axis: number | null; index: number }> = [];
  e.ramps.forEach((r, k) => {
    const problem = rampPathProblem(r.path, ctx);
    if (problem) {
      out.push([at('ramps', k, 'path'), problem]);
      return;
    }
    const target = parseRampPath(r.path);
    // one ramp per parameter: a key and one of its axes cannot both be ramped, nor a key twice
    const family = target.term !== null ? `landscape.${target.term}.${target.key}` : target.key;
    const clash = driven.find((d) => d.family === family && (d.axis === null || target.axis === null || d.axis === target.axis));
    if (clash) out.push([at('ramps', k, 'path'), `${r.path} is already driven by evolution.ramps[${clash.index}] (${e.ramps[clash.index].path}); give one ramp per parameter`]);
    driven.push({ family, axis: target.axis, index: k });
    r.points.forEach((p, m) => {
      if (p[0] < 0) out.push([at('ramps', k, 'points', m), `times start at 0, got ${p[0]}`]);
      if (m > 0 && p[0] < r.points[m - 1][0]) out.push([at('ramps', k, 'points', m), `times must not decrease: ${p[0]} comes after ${r.points[m - 1][0]}`]);
      if (m > 1 && p[0] === r.points[m - 2][0]) out.push([at('ramps', k, 'points', m), `at most two points may share the time ${p[0]} (one jump)`]);
    });
    if (r.shape === 'exponential') {
      for (let m = 0; m + 1 < r.points.length; m++) {
        if (r.points[m + 1][0] > r.points[m][0] && !(r.points[m][1] * r.points[m + 1][1] > 0)) {
          out.push([at('ramps', k, 'shape'), `an exponential segment needs two non-zero values of one sign, got ${r.points[m][1]} and ${r.points[m + 1][1]}; use 'linear' or 's-curve'`]);
          break;
        }
      }
    }
    const positiveKeys = ['hubbard.hopping', 'hubbard.interaction', 'laboratory.depthEr'];
    if (positiveKeys.includes(target.key)) {
      r.points.forEach((p, m) => {
        const bad = target.key === 'hubbard.interaction' ? !(p[1] > 0) : !(p[1] >= 0);
        if (bad) out.push([at('ramps', k, 'points', m, 1), `${target.key} must stay ${target.key === 'hubbard.interaction' ? 'positive' : 'non-negative'}, got ${p[1]}`]);
      });
    }
    if (['trap.coefficient', 'trap.frequencyHz', 'disorder.width', 'disorder.meanStrength'].includes(target.key)) {
      r.points.forEach((p, m) => {
        if (!(p[1] >= 0)) out.push([at('ramps', k, 'points', m, 1), `${target.key} must stay non-negative, got ${p[1]}`]);
      });
    }
  });
  const modulatedPath = (p: string | undefined, where: PropertyKey[]): void => {
    const path = p ?? (ctx.laboratory ? 'laboratory.depthEr' : 'hubbard.hopping');
    if (path === 'laboratory.depthEr' && !ctx.laboratory) out.push([where, 'laboratory.depthEr needs laboratory mode; in hubbard mode modulate hubbard.hopping or hubbard.interaction']);
    if (path !== 'laboratory.depthEr' && ctx.laboratory) out.push([where, `${path} is a key of hubbard mode; in laboratory mode modulate laboratory.depthEr (J and U follow the band structure)`]);
  };
  if (e.modulation) {
    modulatedPath(e.modulation.path, at('modulation', 'path'));
    if (e.modulation.end !== undefined && !(e.modulation.end > e.modulation.start)) {
      out.push([at('modulation', 'end'), `expected end > start (${e.modulation.start}), got ${e.modulation.end}`]);
    }
    if (e.modulation.start >= e.duration && e.duration > 0) out.push([at('modulation', 'start'), `the modulation starts at ${e.modulation.start}, after the end of the evolution (${e.duration})`]);
  }
  if (e.spectrum) {
    const s = e.spectrum;
    modulatedPath(s.path, at('spectrum', 'path'));
    const range = [s.from, s.to, s.count].filter((v) => v !== undefined).length;
    if (s.frequencies !== undefined && range > 0) out.push([at('spectrum'), 'give frequencies or from/to/count, not both']);
    if (s.frequencies === undefined && range !== 3) out.push([at('spectrum'), 'give frequencies, or all three of from, to and count']);
    if (s.from !== undefined && s.to !== undefined && !(s.to >= s.from)) out.push([at('spectrum', 'to'), `expected to >= from (${s.from}), got ${s.to}`]);
    if (s.count === 1 && s.from !== undefined && s.to !== undefined && s.to !== s.from) out.push([at('spectrum', 'count'), 'one frequency needs from = to']);
  }
  const i = e.integrator;
  if (i.kind === 'splitting' && i.step === undefined) out.push([at('integrator', 'step'), "required with kind 'splitting': the fixed step, hbar/E or ms"]);
  if (i.kind === 'dormand-prince' && i.step !== undefined) out.push([at('integrator', 'step'), "only used with kind 'splitting'; the adaptive integrator chooses its steps (limit them with maxStep)"]);
  if (i.kind === 'splitting' && i.maxStep !== undefined) out.push([at('integrator', 'maxStep'), "only used with kind 'dormand-prince'; the splitting takes the fixed step"]);
  if (e.snapshots.times) {
    e.snapshots.times.forEach((t, k) => {
      if (t > e.duration) out.push([at('snapshots', 'times', k), `${t} lies after the end of the evolution (duration ${e.duration})`]);
    });
  }
  return out;
}
