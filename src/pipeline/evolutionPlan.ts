// From the scenario's `evolution` section (src/scenario/evolutionSchema.ts) to what the time
// evolution runs: the time unit and rate of the equations of motion, the output, snapshot and
// animation times, the integrator, and the ramps and modulations as functions of time on the
// quantities the drive sets (scenarioDrive.ts). Pure: the only side effect is the band
// structure tabulated for depth ramps.
//
// Time unit and rate (dc/dt = -i rate H c, src/dynamics/dynamicsFrame.ts): dimensionless
// mode t in hbar/E (E the energy unit, J or U), rate 1; laboratory mode t in ms with
// energies E/h in Hz, rate 2 pi 1e-3. A frequency given as an energy h f (internal unit e)
// makes rate e / (2 pi) cycles per time unit.
//
// What each ramp drives (values in the key's own unit):
//   hubbard.hopping          J along every axis x factor v(t)/J_x (the axes keep their ratios);
//   hubbard.hopping.d        J along axis d x v(t)/J_d;   hubbard.interaction  U x v(t)/U
//   laboratory.depthEr(.d)   the depth s_d(t) of all (one) lattice axes; J and U follow the
//                            band structure; with beam waists the envelope confinement
//                            follows too (stiffness of beam d proportional to
//                            s_d (1 - d<E_0>/ds), beamEnvelope.ts, tabulated on the ramp's range)
//   trap.coefficient(.d)     k_d(t), energy per site^2;   trap.frequencyHz(.d)  f_d(t), Hz
//                            (combined with the beam envelope: f^2 = f_trap^2 + f_env^2)
//   trap.centreSites(.d)     c_d(t), sites (a moving trap: dipole oscillations)
//   disorder.width, disorder.meanStrength, landscape.<k>.<amplitude>: the term's site
//                            energies scale linearly with the amplitude.
// A schedule's value at t = 0 that differs from the static one is a sudden quench at t = 0
// (the start is the static ground state); every such ramp is listed in `quenches`.

import { ParameterError } from '../physics/parameterError.js';
import { latticeBand1d, meanBandDepthDerivative } from '../physics/bandStructure.js';
import { trapCurvatureHzPerSite2 } from '../physics/harmonicTrap.js';
import { laboratoryRate } from '../dynamics/dynamicsFrame.js';
import { depthTableCovering } from '../dynamics/depthTable.js';
import { latticeModulation } from '../dynamics/latticeModulation.js';
import { isQuenchAtStart, rampSchedule, type RampShape } from '../dynamics/rampSchedule.js';
import { constantFunction, type TimeFunction } from '../dynamics/timeFunction.js';
import type { IntegratorOptions } from '../dynamics/evolve.js';
import type { LatticeAxisInterpolator } from '../physics/depthInterpolation.js';
import { isClusterShape } from '../solver/cluster/clusterSweepExecutor.js';
import { InputError } from '../scenario/inputError.js';
import { parseRampPath, type EvolutionSettings } from '../scenario/evolutionSchema.js';
import { resolveScenario, type ResolvedScenario } from '../scenario/resolveScenario.js';
import { internalEnergyPerUnit } from '../scenario/scenarioEnergyUnit.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import type { DriveTargets, LinearSiteTerm } from './scenarioDrive.js';

export type ModulatedPath = 'laboratory.depthEr' | 'hubbard.hopping' | 'hubbard.interaction';

export interface RampRecord {
  path: string;
  shape: RampShape;
  points: Array<[number, number]>;
  /** unit of the values */
  unit: string;
  /** the static scenario's value (per axis for a ramp of all axes) */
  staticValue: number[];
  valueAtStart: number;
  valueAtEnd: number;
  /** the value at t = 0 differs from the static one: a sudden change at t = 0 */
  quenchAtStart: boolean;
}

export interface ModulationRecord {
  path: ModulatedPath;
  relativeAmplitude: number;
  /** h f in the energy unit */
  frequency: number;
  /** cycles per time unit (kHz in laboratory mode) */
  cyclesPerTimeUnit: number;
  start: number;
  end: number;
}

export interface SpectrumPlan {
  path: ModulatedPath;
  relativeAmplitude: number;
  /** h f in the energy unit */
  frequencies: number[];
  cyclesPerTimeUnit: number[];
  /** modulation time per frequency; null: 10 h/U at the final U (set by the pipeline) */
  duration: number | null;
  /** 'scenario' or 'command line' */
  source: string;
}

export interface EvolutionPlanWarning {
  code: string;
  message: string;
}

/** The parts of the drive in scenario terms, before a modulation is folded in. */
interface Schedules {
  hoppingFactor: Array<TimeFunction | null>;
  interactionFactor: TimeFunction | null;
  depthEr: Array<TimeFunction | null>;
  /** dimensionless: k_d(t) internal; laboratory: null (from the frequencies) */
  trapCoefficient: Array<TimeFunction | null>;
  trapFrequencyHz: Array<TimeFunction | null>;
  trapCentre: Array<TimeFunction | null>;
  linear: Array<{ unitField: Float64Array; amplitude: TimeFunction; staticAmplitude: number }>;
}

export interface EvolutionPlan {
  settings: EvolutionSettings;
  mode: 'hubbard' | 'laboratory';
  /** 'ħ/J', 'ħ/U' or 'ms' */
  timeUnit: string;
  /** words for outputs, e.g. 'hbar/U (the scenario energy unit U)' */
  timeUnitNote: string;
  rate: number;
  duration: number;
  outputTimes: number[];
  snapshotTimes: number[];
  frameTimes: number[];
  integrator: IntegratorOptions;
  ramps: RampRecord[];
  quenches: RampRecord[];
  modulation: ModulationRecord | null;
  spectrum: SpectrumPlan | null;
  warnings: EvolutionPlanWarning[];
  /** the drive targets of the main evolution */
  targets: DriveTargets;
  /**
   * The drive targets of one spectrum point: the values at `atTime` frozen, `path` modulated
   * from 0 to `duration` (relative amplitude: the spectrum's, or `relativeAmplitude`; 0 gives
   * the unmodulated reference).
   */
  spectrumTargets(frequencyCycles: number, duration: number, atTime: number, relativeAmplitude?: number): DriveTargets;
  /** cycles per time unit of an energy h f in the energy unit */
  cyclesOf(energyInUnit: number): number;
}

export interface PlanOptions {
  /** h f of the spectrum points in the energy unit (--modulation-frequencies); replaces the scenario's */
  modulationFrequencies?: number[];
  /** folder of the scenario file (landscape files are read again for a term ramped from 0) */
  scenarioDirectory?: string;
}

function perAxis(v: number | number[] | undefined, dims: number, fallback: number): number[] {
  if (v === undefined) return Array<number>(dims).fill(fallback);
  if (typeof v === 'number') return Array<number>(dims).fill(v);
  return v.length === 1 ? Array<number>(dims).fill(v[0]) : [...v];
}

const mapped = (f: TimeFunction, fn: (v: number) => number): TimeFunction => ({
  breakpoints: f.breakpoints,
  valueAt: (t, left) => fn(f.valueAt(t, left)),
});

const product = (a: TimeFunction, b: TimeFunction): TimeFunction => {
  const all = [...a.breakpoints, ...b.breakpoints].sort((x, y) => x - y);
  return { breakpoints: all.filter((t, k) => k === 0 || t !== all[k - 1]), valueAt: (t, left) => a.valueAt(t, left) * b.valueAt(t, left) };
};

const frozen = (f: TimeFunction | null, at: number): TimeFunction | null => (f === null ? null : constantFunction(f.valueAt(at)));

/** Ascending unique times, each rounded to the nearest representable grid point k * step. */
function outputGrid(settings: EvolutionSettings): number[] {
  const T = settings.duration;
  const times = new Set<number>([0, T]);
  if (settings.outputTimes) for (const t of settings.outputTimes) times.add(t);
  else if (T > 0) {
    const step = settings.outputEvery ?? T / 100;
    const count = Math.floor(T / step + 1e-9);
    for (let k = 0; k <= count; k++) times.add(Math.min(T, k * step));
  }
  return [...times].sort((a, b) => a - b);
}

/** Indices of `count` evenly spaced entries of a list of length n (first and last included). */
function evenlySpacedIndices(n: number, count: number): number[] {
  if (count <= 0 || n === 0) return [];
  if (count >= n) return Array.from({ length: n }, (_, k) => k);
  if (count === 1) return [n - 1];
  const out = new Set<number>();
  for (let k = 0; k < count; k++) out.add(Math.round((k * (n - 1)) / (count - 1)));
  return [...out].sort((a, b) => a - b);
}

/** g(s) = s (1 - d<E_0>/ds), the depth dependence of a beam's envelope stiffness, tabulated on [lo, hi]. */
function envelopeStiffnessTable(lo: number, hi: number): (s: number) => number {
  const count = 41;
  const nodes = new Float64Array(count);
  const values = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    const s = lo + ((hi - lo) * k) / (count - 1);
    nodes[k] = s;
    values[k] = s > 0 ? s * (1 - meanBandDepthDerivative(latticeBand1d(s))) : 0;
  }
  return (s: number): number => {
    if (s <= lo) return values[0];
    if (s >= hi) return values[count - 1];
    const x = ((s - lo) / (hi - lo)) * (count - 1);
    const k = Math.min(count - 2, Math.floor(x));
    return values[k] + (values[k + 1] - values[k]) * (x - k);
  };
}

/** `count` frequencies from `from` to `to`, both included (one: `from`). */
export function evenlySpacedFrequencies(from: number, to: number, count: number): number[] {
  return Array.from({ length: count }, (_, k) => (count === 1 ? from : from + ((to - from) * k) / (count - 1)));
}

/** The spectrum frequencies of --modulation-frequencies from:to:count, refused (naming the option) when the range is reversed or one point spans a range. */
export function modulationFrequencyGrid(from: number, to: number, count: number): number[] {
  if (!(to >= from)) throw new InputError(`--modulation-frequencies: expected from <= to, got ${from} and ${to}`);
  if (count === 1 && to !== from) throw new InputError('--modulation-frequencies: one frequency needs from = to (or give it alone)');
  return evenlySpacedFrequencies(from, to, count);
}

export function evolutionPlan(resolved: ResolvedScenario, options: PlanOptions = {}): EvolutionPlan {
  const scenario = resolved.scenario;
  const settings = scenario.evolution;
  if (!settings) {
    throw new InputError('evolution: the scenario has no "evolution" section; add one with at least "duration" (and "ramps"), or use --set evolution.duration=...');
  }
  if (isClusterShape(resolved.scenario.solver.cluster)) {
    throw new InputError(
      `solver.cluster: evolve integrates the single-site time-dependent Gutzwiller equations only; remove solver.cluster (or set it to [${resolved.scenario.solver.cluster.map(() => 1).join(', ')}]) to evolve this scenario`,
    );
  }
  const dims = resolved.geometry.dims;
  const laboratory = resolved.mode === 'laboratory';
  const units = resolved.units;
  const rate = laboratory ? laboratoryRate(1e-3) : 1;
  const energyUnit = scenario.energyUnit ?? (laboratory ? 'Hz' : 'J');
  const timeUnit = laboratory ? 'ms' : `ħ/${energyUnit}`;
  const timeUnitNote = laboratory
    ? 'milliseconds (laboratory mode)'
    : `hbar/${energyUnit}, with ${energyUnit} the energy unit of the scenario (h/${energyUnit} = 2 pi in these units)`;
  // energies of the scenario -> internal unit
  const unitEnergy = internalEnergyPerUnit(energyUnit, units);
  const cyclesOf = (energyInUnit: number): number => (rate * energyInUnit * unitEnergy) / (2 * Math.PI);
  const warnings: EvolutionPlanWarning[] = [];

  // --- times
  const duration = settings.duration;
  const grid = new Set(outputGrid(settings));
  let snapshotTimes: number[];
  if (settings.snapshots.times) snapshotTimes = [...new Set(settings.snapshots.times)].sort((a, b) => a - b);
  else {
    const count = settings.snapshots.count;
    snapshotTimes = count === 1 || duration === 0 ? [duration] : Array.from({ length: count }, (_, k) => (k === count - 1 ? duration : (k * duration) / (count - 1)));
  }
  for (const t of snapshotTimes) grid.add(t);
  const outputTimes = [...grid].sort((a, b) => a - b);
  const frameTimes = evenlySpacedIndices(outputTimes.length, settings.animationFrames).map((k) => outputTimes[k]);

  // --- integrator
  const i = settings.integrator;
  const integrator: IntegratorOptions =
    i.kind === 'splitting'
      ? { kind: 'splitting', step: i.step as number, order: i.order }
      : {
          kind: 'dormand-prince',
          absoluteTolerance: i.absoluteTolerance,
          relativeTolerance: i.relativeTolerance,
          maxSteps: i.maxSteps,
          ...(i.maxStep !== undefined ? { maxStep: i.maxStep } : {}),
        };

  // --- static values in the keys' own units
  const hub = scenario.hubbard;
  const staticHopping = hub ? (energyUnit === 'J' ? perAxis(hub.hopping, dims, 1) : perAxis(hub.hopping, dims, NaN)) : [];
  const staticInteraction = hub ? (energyUnit === 'U' ? 1 : (hub.interaction as number)) : NaN;
  const staticDepth = scenario.laboratory ? perAxis(scenario.laboratory.depthEr, dims, NaN) : [];
  const staticCoefficient = perAxis(scenario.trap?.coefficient, dims, 0);
  const staticFrequency = perAxis(scenario.trap?.frequencyHz, dims, 0);
  const staticCentre = [...resolved.trapCentre];

  const schedules: Schedules = {
    hoppingFactor: Array(dims).fill(null),
    interactionFactor: null,
    depthEr: Array(dims).fill(null),
    trapCoefficient: Array(dims).fill(null),
    trapFrequencyHz: Array(dims).fill(null),
    trapCentre: Array(dims).fill(null),
    linear: [],
  };
  // Keys whose ramp sets the value of each axis it names, in the key's own unit.
  const perAxisKeys = {
    'laboratory.depthEr': { staticValue: staticDepth, schedules: schedules.depthEr, unit: 'E_r' },
    // hubbard mode: the internal unit is the energy unit
    'trap.coefficient': { staticValue: staticCoefficient, schedules: schedules.trapCoefficient, unit: `${energyUnit} per site²` },
    'trap.frequencyHz': { staticValue: staticFrequency, schedules: schedules.trapFrequencyHz, unit: 'Hz' },
    'trap.centreSites': { staticValue: staticCentre, schedules: schedules.trapCentre, unit: 'sites' },
  };
  const ramps: RampRecord[] = [];
  settings.ramps.forEach((r, k) => {
    const where = `evolution.ramps[${k}]`;
    let schedule: TimeFunction;
    try {
      schedule = rampSchedule({ path: r.path, points: r.points.map((p) => [p[0], p[1]] as const), shape: r.shape });
    } catch (err) {
      if (err instanceof ParameterError) throw new InputError(`${where}: ${err.message}`);
      throw err;
    }
    const target = parseRampPath(r.path);
    const axes = target.axis === null ? Array.from({ length: dims }, (_, d) => d) : [target.axis];
    let staticValue: number[];
    let unit: string;
    switch (target.key) {
      case 'hubbard.hopping': {
        // all axes: the value is J along x; every axis is scaled by v/J_x
        const reference = target.axis === null ? staticHopping[0] : staticHopping[target.axis];
        staticValue = target.axis === null ? [reference] : [reference];
        for (const d of axes) schedules.hoppingFactor[d] = mapped(schedule, (v) => v / reference);
        unit = energyUnit;
        break;
      }
      case 'hubbard.interaction':
        staticValue = [staticInteraction];
        schedules.interactionFactor = mapped(schedule, (v) => v / staticInteraction);
        unit = energyUnit;
        break;
      case 'laboratory.depthEr':
      case 'trap.coefficient':
      case 'trap.frequencyHz':
      case 'trap.centreSites': {
        // a per-axis key: the ramp's value itself, on each axis it names
        const k = perAxisKeys[target.key];
        staticValue = axes.map((d) => k.staticValue[d]);
        for (const d of axes) k.schedules[d] = schedule;
        unit = k.unit;
        break;
      }
      case 'disorder.width':
      case 'disorder.meanStrength': {
        const d = scenario.disorder!;
        const a0 = d.kind === 'box' ? d.width : d.meanStrength;
        staticValue = [a0];
        const unitField = a0 !== 0 ? scaled(resolved.disorder as Float64Array, 1 / a0) : (unitAmplitudeField(scenario, target.key, null, options.scenarioDirectory) as Float64Array);
        schedules.linear.push({ unitField, amplitude: schedule, staticAmplitude: a0 });
        unit = energyUnit;
        break;
      }
      default: {
        // landscape.<k>.<amplitude>
        const index = target.term as number;
        const key = target.key.slice('landscape.'.length);
        const term = (scenario.landscape ?? [])[index] as Record<string, unknown>;
        const a0 = term[key] as number;
        staticValue = [a0];
        const unitField = a0 !== 0 ? scaled(resolved.landscape.fields[index], 1 / a0) : (unitAmplitudeField(scenario, key, index, options.scenarioDirectory) as Float64Array);
        schedules.linear.push({ unitField, amplitude: schedule, staticAmplitude: a0 });
        unit = key === 'depthEr' ? 'E_r of the second wavelength' : key === 'accelerationMPerS2' ? 'm/s²' : key === 'perUm' ? `${(term.unit as string | undefined) ?? energyUnit} per µm` : ((term.unit as string | undefined) ?? energyUnit);
      }
    }
    const valueAtStart = schedule.valueAt(0);
    const quenchAtStart = staticValue.some((v) => isQuenchAtStart(schedule, v, 0));
    ramps.push({
      path: r.path,
      shape: r.shape,
      points: r.points.map((p) => [p[0], p[1]]),
      unit,
      staticValue,
      valueAtStart,
      valueAtEnd: schedule.valueAt(duration),
      quenchAtStart,
    });
  });
  const quenches = ramps.filter((r) => r.quenchAtStart);
  for (const q of quenches) {
    warnings.push({
      code: 'quench-at-start',
      message: `${q.path} starts at ${q.valueAtStart} ${q.unit} but the scenario's value is ${q.staticValue.join(', ')}: a sudden quench at t = 0 from the static ground state`,
    });
  }

  // --- modulation during the evolution
  let modulation: ModulationRecord | null = null;
  const m = settings.modulation;
  if (m) {
    const path: ModulatedPath = m.path ?? (laboratory ? 'laboratory.depthEr' : 'hubbard.hopping');
    const end = m.end ?? Math.max(duration, m.start);
    modulation = { path, relativeAmplitude: m.relativeAmplitude, frequency: m.frequency, cyclesPerTimeUnit: cyclesOf(m.frequency), start: m.start, end };
  }

  // --- spectrum
  let spectrum: SpectrumPlan | null = null;
  const s = settings.spectrum;
  const fromCommandLine = options.modulationFrequencies !== undefined;
  if (s || fromCommandLine) {
    const path: ModulatedPath = s?.path ?? (laboratory ? 'laboratory.depthEr' : 'hubbard.hopping');
    const frequencies = options.modulationFrequencies ?? s?.frequencies ?? evenlySpacedFrequencies(s!.from as number, s!.to as number, s!.count as number);
    spectrum = {
      path,
      relativeAmplitude: s?.relativeAmplitude ?? 0.1,
      frequencies,
      cyclesPerTimeUnit: frequencies.map(cyclesOf),
      duration: s?.duration ?? null,
      source: fromCommandLine ? 'command line (--modulation-frequencies)' : 'scenario (evolution.spectrum)',
    };
  }

  // --- depth table (laboratory mode), covering every depth a ramp or modulation reaches
  let depthTable: LatticeAxisInterpolator | null = null;
  let stiffness: ((s: number) => number) | null = null;
  const depthModulated = modulation?.path === 'laboratory.depthEr' || spectrum?.path === 'laboratory.depthEr';
  if (laboratory && (schedules.depthEr.some((f) => f !== null) || depthModulated)) {
    const amplitude = Math.max(modulation?.path === 'laboratory.depthEr' ? modulation.relativeAmplitude : 0, spectrum?.path === 'laboratory.depthEr' ? spectrum.relativeAmplitude : 0);
    const visited: number[] = [...staticDepth];
    settings.ramps.forEach((r) => {
      if (parseRampPath(r.path).key === 'laboratory.depthEr') for (const p of r.points) visited.push(p[1]);
    });
    const reach = visited.flatMap((v) => [v * (1 - amplitude), v * (1 + amplitude)]);
    try {
      depthTable = depthTableCovering(reach);
    } catch (err) {
      if (err instanceof ParameterError) {
        throw new InputError(`evolution.ramps: ${err.message.replace(/^depthEr: /, '')}; keep laboratory.depthEr ramps and modulations inside that range`);
      }
      throw err;
    }
    if (scenario.laboratory?.beamWaistUm !== undefined) {
      stiffness = envelopeStiffnessTable(Math.min(...reach), Math.max(...reach));
    }
    const siteResolved = resolved.model.hopping.some((h) => typeof h !== 'number') || typeof resolved.model.interactionU !== 'number';
    if (siteResolved) {
      warnings.push({
        code: 'envelope-approximation',
        message:
          'the lattice depth is driven while J and U vary from site to site (beam envelope or a combined superlattice): every site is rescaled by the ratio J(s(t))/J(s(0)) and W4(s(t))/W4(s(0)) of the central depth, an approximation away from the centre',
      });
    }
  }

  /** DriveTargets from schedules (modulation folded in by the caller). */
  const assemble = (sch: Schedules): DriveTargets => {
    const trapCoefficient: Array<TimeFunction | null> = Array(dims).fill(null);
    if (!laboratory) {
      for (let d = 0; d < dims; d++) trapCoefficient[d] = sch.trapCoefficient[d];
    } else {
      const lab = resolved.laboratory!;
      const depthDriven = sch.depthEr.some((f) => f !== null);
      const waists = scenario.laboratory?.beamWaistUm !== undefined ? perAxis(scenario.laboratory.beamWaistUm, dims, NaN) : null;
      const envelopeFollows = depthDriven && waists !== null && stiffness !== null;
      const perHz2 = trapCurvatureHzPerSite2(lab.massKg, [1], [lab.latticeSpacingUm])[0];
      for (let a = 0; a < dims; a++) {
        const frequency = sch.trapFrequencyHz[a];
        if (frequency === null && !envelopeFollows) continue;
        const trap0 = staticFrequency[a] ** 2;
        const envelope0 = lab.envelopeFrequencyHz[a] ** 2;
        const total0 = trap0 + envelope0;
        const k0 = resolved.trapCoefficient[a];
        const others = Array.from({ length: dims }, (_, d) => d).filter((d) => d !== a);
        const stiffness0 = envelopeFollows ? others.reduce((sum, d) => sum + (stiffness as (s: number) => number)(staticDepth[d]) / (waists![d] * waists![d]), 0) : 1;
        const parts: TimeFunction[] = [frequency, ...(envelopeFollows ? others.map((d) => sch.depthEr[d]) : [])].filter((f): f is TimeFunction => f !== null);
        const all = parts.flatMap((f) => [...f.breakpoints]).sort((x, y) => x - y);
        trapCoefficient[a] = {
          breakpoints: all.filter((t, k) => k === 0 || t !== all[k - 1]),
          valueAt: (t, left) => {
            const trap = frequency ? frequency.valueAt(t, left) ** 2 : trap0;
            let envelope = envelope0;
            if (envelopeFollows && stiffness0 > 0) {
              let sum = 0;
              for (const d of others) {
                const depth = sch.depthEr[d] ? (sch.depthEr[d] as TimeFunction).valueAt(t, left) : staticDepth[d];
                sum += (stiffness as (s: number) => number)(depth) / (waists![d] * waists![d]);
              }
              envelope = envelope0 * (sum / stiffness0);
            }
            // as a ratio to the static total, so that the start is the static trap bit for bit
            return total0 > 0 ? k0 * ((trap + envelope) / total0) : perHz2 * (trap + envelope);
          },
        };
      }
    }
    return {
      hoppingFactor: sch.hoppingFactor,
      interactionFactor: sch.interactionFactor,
      depthEr: sch.depthEr,
      staticDepthEr: laboratory ? staticDepth : Array(dims).fill(NaN),
      depthTable,
      trapCoefficient,
      trapCentre: sch.trapCentre,
      staticTrapCoefficient: [...resolved.trapCoefficient],
      staticTrapCentre: staticCentre,
      linearTerms: sch.linear.map((l): LinearSiteTerm => ({ unitField: l.unitField, amplitude: l.amplitude, staticAmplitude: l.staticAmplitude })),
    };
  };

  const withModulation = (sch: Schedules, path: ModulatedPath, factor: TimeFunction): Schedules => {
    const out: Schedules = { ...sch, hoppingFactor: [...sch.hoppingFactor], depthEr: [...sch.depthEr] };
    if (path === 'laboratory.depthEr') {
      for (let d = 0; d < dims; d++) out.depthEr[d] = product(sch.depthEr[d] ?? constantFunction(staticDepth[d]), factor);
    } else if (path === 'hubbard.hopping') {
      for (let d = 0; d < dims; d++) out.hoppingFactor[d] = product(sch.hoppingFactor[d] ?? constantFunction(1), factor);
    } else {
      out.interactionFactor = product(sch.interactionFactor ?? constantFunction(1), factor);
    }
    return out;
  };

  const mainSchedules = modulation
    ? withModulation(
        schedules,
        modulation.path,
        latticeModulation({ baseValue: 1, relativeAmplitude: modulation.relativeAmplitude, frequency: modulation.cyclesPerTimeUnit, startTime: modulation.start, endTime: modulation.end }),
      )
    : schedules;
  const targets = assemble(mainSchedules);

  const spectrumTargets = (frequencyCycles: number, spectrumDuration: number, atTime: number, relativeAmplitude?: number): DriveTargets => {
    if (!spectrum) throw new RangeError('spectrumTargets: the plan has no spectrum');
    // the Hamiltonian of the end of the evolution, held fixed, with the chosen key modulated
    const held: Schedules = {
      hoppingFactor: mainSchedules.hoppingFactor.map((f) => frozen(f, atTime)),
      interactionFactor: frozen(mainSchedules.interactionFactor, atTime),
      depthEr: mainSchedules.depthEr.map((f) => frozen(f, atTime)),
      trapCoefficient: mainSchedules.trapCoefficient.map((f) => frozen(f, atTime)),
      trapFrequencyHz: mainSchedules.trapFrequencyHz.map((f) => frozen(f, atTime)),
      trapCentre: mainSchedules.trapCentre.map((f) => frozen(f, atTime)),
      linear: mainSchedules.linear.map((l) => ({ ...l, amplitude: constantFunction(l.amplitude.valueAt(atTime)) })),
    };
    const factor = latticeModulation({ baseValue: 1, relativeAmplitude: relativeAmplitude ?? spectrum.relativeAmplitude, frequency: frequencyCycles, startTime: 0, endTime: spectrumDuration });
    return assemble(withModulation(held, spectrum.path, factor));
  };

  return {
    settings,
    mode: resolved.mode,
    timeUnit,
    timeUnitNote,
    rate,
    duration,
    outputTimes,
    snapshotTimes,
    frameTimes,
    integrator,
    ramps,
    quenches,
    modulation,
    spectrum,
    warnings,
    targets,
    spectrumTargets,
    cyclesOf,
  };
}

function scaled(field: Float64Array, factor: number): Float64Array {
  const out = new Float64Array(field.length);
  for (let i = 0; i < field.length; i++) out[i] = field[i] * factor;
  return out;
}

/**
 * Site energies of a linear term at unit amplitude when the static amplitude is 0: the
 * scenario resolved again with that amplitude set to 1 (same seed, same files).
 */
function unitAmplitudeField(scenario: Scenario, key: string, landscapeIndex: number | null, scenarioDirectory: string | undefined): Float64Array | null {
  if (landscapeIndex === null) {
    const d = scenario.disorder!;
    const unit: Scenario = { ...scenario, disorder: d.kind === 'box' ? { ...d, width: 1 } : { ...d, meanStrength: 1 } };
    return resolveScenario(unit, { scenarioDirectory }).disorder;
  }
  const terms = [...(scenario.landscape ?? [])];
  terms[landscapeIndex] = { ...terms[landscapeIndex], [key]: 1 } as (typeof terms)[number];
  return resolveScenario({ ...scenario, landscape: terms }, { scenarioDirectory }).landscape.fields[landscapeIndex];
}
