import { propose, type PlantVariant, type Proposal, type TuneMethod, type TuneOptions } from '../../design/propose.js';
import { TUNE_METHODS } from '../../design/tune-options.js';
import { formatWorksheet } from '../../design/worksheet.js';
import { parseRequirement } from '../../engine/requirement-syntax.js';
import type { Block } from '../../model/blocks.js';
import { UserError } from '../../model/errors.js';
import type { Requirement } from '../../model/requirements.js';
import { parseFrequencyRadS, splitNumberSuffix, type FreqUnit } from '../../model/units.js';
import { changeOptions, JSON_OPT, NOTE, parseCommand, type CommandSpec, type Parsed } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText } from '../output.js';
import { outcomeLines } from '../present.js';
import { withMachine } from '../store.js';
import { blockWords, proposalJson, proposalLines } from './tune-view.js';

const SPEC: CommandSpec = {
  name: 'tune',
  usage: [
    'usage: loopledger tune AXIS/LOOP METHOD [options] [--apply -m NOTE] [--json]',
    '       loopledger tune --plant EXPR [--plant NAME=EXPR ...] [--comp EXPR] [--spec REQ ...] METHOD [options] [--json]',
    '',
    'Proposes a compensator by a classic frequency-response method, shows its worksheet and',
    'the predicted metrics on every plant variant, and judges every requirement. Nothing is',
    'written unless --apply is given; then the compensator is saved as a new revision whose',
    'note holds the worksheet. Targets default to the loop\'s own requirements.',
    '',
    'METHOD: lead     phase lead by the Bode procedure (with --fc: lead at that crossover)',
    '        lag      phase lag: low-frequency gain at an almost unchanged crossover',
    '        leadlag  lag for the error constant, lead for the phase',
    '        pid      PI or PID with derivative filter placed at --fc',
    '        notch    notches for lightly damped plant resonances (added to the compensator)',
    '        lowpass  a low-pass above the crossover, spending spare phase (added)',
    '',
    '  --pm DEG               target phase margin',
    '  --fc FREQ              chosen crossover (Hz or rad/s suffix; bare: the store\'s unit)',
    '  --kv X | --kp X | --ka X   error-constant target',
    '  --allow DEG            allowance added to the phase (default 5 lead, 10 lag)',
    '  --stages N             force N lead stages',
    '  --max-stage-phase DEG  most phase one lead stage may add (default 60)',
    '  --lag-ratio R          lag zero R times below the crossover (default 10)',
    '  --variant NAME         variant the hand procedure reads (default: the first)',
    '  --form pi|pid          PID form (default: PI when the plant has phase to spare at fc)',
    '  --order 1|2            low-pass order (default 2)',
    '  --zeta-max Z           damping below which a plant pole is a resonance (default 0.15)',
    '  --apply -m NOTE        save the proposal as a revision (only when it meets every requirement)',
    '  --even-if-failing      with --apply: save a stable proposal that still misses requirements',
    '                         (a step of a longer retune); an unstable one is never saved',
    '  store-free: --plant EXPR (repeat, NAME=EXPR names a variant), --comp EXPR, --spec REQ (repeat);',
    '              bare frequencies in rad/s',
  ].join('\n'),
  options: {
    plant: { type: 'string', multiple: true },
    comp: { type: 'string' },
    spec: { type: 'string', multiple: true },
    pm: { type: 'string' },
    fc: { type: 'string' },
    kv: { type: 'string' },
    kp: { type: 'string' },
    ka: { type: 'string' },
    allow: { type: 'string' },
    stages: { type: 'string' },
    'max-stage-phase': { type: 'string' },
    'lag-ratio': { type: 'string' },
    variant: { type: 'string' },
    form: { type: 'string' },
    order: { type: 'string' },
    'zeta-max': { type: 'string' },
    apply: { type: 'boolean' },
    'even-if-failing': { type: 'boolean' },
    ...NOTE,
    ...JSON_OPT,
  },
  positionals: { min: 1, max: 2, what: 'METHOD (and AXIS/LOOP unless --plant is given)' },
};

const TITLES: Record<TuneMethod, string> = {
  lead: 'phase lead, Bode procedure',
  lag: 'phase lag',
  leadlag: 'lead-lag',
  pid: 'PI/PID placed at the crossover',
  notch: 'notch for plant resonances',
  lowpass: 'low-pass above the crossover',
};

/** A plain number option (an optional unit suffix among `units`). */
function numberOpt(p: Parsed, name: string, units: readonly string[] = []): number | null {
  const t = p.str(name);
  if (t === undefined) return null;
  const { value, suffix } = splitNumberSuffix(t, `--${name}`);
  if (suffix !== '' && !units.includes(suffix)) throw new UserError(`--${name}: unexpected unit '${suffix}' in '${t}'${units.length > 0 ? `; use ${units.join(' or ')} or none` : '; give a plain number'}`);
  return value;
}

/** The design options from the command line. */
function tuneOptions(p: Parsed, unit: FreqUnit): TuneOptions {
  const ecs = (['kv', 'kp', 'ka'] as const).filter((k) => p.str(k) !== undefined);
  if (ecs.length > 1) throw new UserError('tune: give one of --kv, --kp, --ka');
  const form = p.str('form');
  if (form !== undefined && form !== 'pi' && form !== 'pid') throw new UserError(`--form: '${form}' is not pi or pid`);
  const order = numberOpt(p, 'order');
  if (order !== null && order !== 1 && order !== 2) throw new UserError('--order: the low-pass order is 1 or 2');
  const fc = p.str('fc');
  const ec = ecs[0];
  return {
    pmDeg: numberOpt(p, 'pm', ['deg']),
    fcRadS: fc === undefined ? null : parseFrequencyRadS(fc, unit, '--fc'),
    errorConstant: ec === undefined ? null : { kind: ec, value: numberOpt(p, ec)! },
    allowDeg: numberOpt(p, 'allow', ['deg']),
    stages: numberOpt(p, 'stages'),
    maxStagePhaseDeg: numberOpt(p, 'max-stage-phase', ['deg']),
    lagZeroRatio: numberOpt(p, 'lag-ratio'),
    designVariant: p.str('variant') ?? null,
    pidForm: (form as 'pi' | 'pid' | undefined) ?? 'auto',
    lowpassOrder: (order ?? 2) as 1 | 2,
    zetaMax: numberOpt(p, 'zeta-max'),
  };
}

function method(text: string): TuneMethod {
  const m = text.toLowerCase() as TuneMethod;
  if (!TUNE_METHODS.includes(m)) throw new UserError(`tune: unknown method '${text}'; use one of ${TUNE_METHODS.join(', ')}`);
  return m;
}

/** Prints the proposal; exit status 0 when it meets every requirement, 1 otherwise. */
function show(ctx: CommandContext, p: Parsed, proposal: Proposal, title: string, unit: FreqUnit, extra: Record<string, unknown> = {}, extraLines: string[] = []): number {
  if (p.flag('json')) ctx.out(jsonText({ ...proposalJson(proposal, unit), ...extra }));
  else ctx.out([...proposalLines(proposal, title, unit), ...extraLines].join('\n'));
  return proposal.ok ? 0 : 1;
}

/** Store-free: plants, existing compensator and requirements from the command line. */
async function runStoreFree(ctx: CommandContext, p: Parsed, m: TuneMethod): Promise<number> {
  const { parseTransferFunction } = await import('../../analysis/parse.js');
  const plants: PlantVariant[] = (p.values.plant as string[]).map((t, i) => {
    const eq = t.indexOf('=');
    const name = eq > 0 ? t.slice(0, eq).trim() : i === 0 ? 'nominal' : `variant${i + 1}`;
    return { name, tf: parseTransferFunction(eq > 0 ? t.slice(eq + 1) : t, 'plant') };
  });
  const compText = p.str('comp');
  const existing: Block[] = compText === undefined ? [] : [{ kind: 'expr', text: compText, tf: parseTransferFunction(compText, 'compensator') }];
  const reqs: Requirement[] = ((p.values.spec as string[] | undefined) ?? []).map((t) => parseRequirement(t, 'rad'));
  const proposal = propose(m, plants, existing, reqs, tuneOptions(p, 'rad'));
  return show(ctx, p, proposal, `tune ${m}: ${TITLES[m]}`, 'rad');
}

/** Entry point of the command (see SPEC.usage). */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const storeFree = p.values.plant !== undefined;
  if (storeFree) {
    if (p.positionals.length !== 1) throw new UserError('tune --plant: give only the METHOD (no AXIS/LOOP), e.g. tune --plant \'4/(s*(s+2))\' lead --pm 50 --kv 20');
    if (p.flag('apply')) throw new UserError('tune --plant works without a store and cannot --apply; tune AXIS/LOOP METHOD --apply -m NOTE saves to a store');
    return runStoreFree(ctx, p, method(p.positionals[0]!));
  }
  if (p.positionals.length !== 2) throw new UserError("tune: give AXIS/LOOP and METHOD, e.g. tune X/pos lead, or --plant EXPR for a loop without a store; see 'loopledger tune --help'");
  if (p.values.comp !== undefined || p.values.spec !== undefined) throw new UserError('tune: --comp and --spec are for --plant (store-free) use; a stored loop brings its own');
  const [ref, methodText] = p.positionals as [string, string];
  const m = method(methodText);
  const change = changeOptions(p);
  if (p.flag('apply') && (change.note === undefined || change.note.trim() === '')) throw new UserError('tune --apply needs -m NOTE saying why the compensator changes');
  if (p.flag('even-if-failing') && !p.flag('apply')) throw new UserError('--even-if-failing only goes with --apply');
  return withMachine(ctx, change.author, async (machine) => {
    const unit = machine.settings().unit;
    // The plants the loop really controls (behind its closed inner loop), formed by the engine as check forms them.
    const loop = await machine.effectivePlants(ref);
    const plants: PlantVariant[] = loop.variants.map((v) => ({ name: v.variant, tf: v.tf }));
    const opts: TuneOptions = { ...tuneOptions(p, unit), innerBandwidthRadS: loop.innerBandwidthRadS, ideal: loop.state.compensator.ideal === true };
    const proposal = propose(m, plants, loop.state.compensator.blocks, loop.state.requirements, opts);
    const title = `tune ${ref} ${m}: ${TITLES[m]} (from revision ${loop.revision})`;
    const warnLines = loop.warnings.map((w) => `warning: ${w}`);
    if (!p.flag('apply')) {
      const hint = proposal.ok ? [`not applied: add --apply -m NOTE to save it (or: loopledger comp set ${ref} ${blockWords(proposal.blocks, unit)})`] : [];
      return show(ctx, p, proposal, title, unit, { applied: null, warnings: loop.warnings }, [...warnLines, ...hint]);
    }
    const stable = proposal.blocks.length > 0 && proposal.perVariant.every((v) => v.metrics !== null && v.metrics.stable);
    if (!proposal.ok && !(stable && p.flag('even-if-failing'))) {
      show(ctx, p, proposal, title, unit, { applied: null, warnings: loop.warnings }, warnLines);
      const why = stable ? 'it misses requirements (add --even-if-failing to save it as a step anyway)' : 'it is not stable on every variant, or there is nothing to save';
      throw new UserError(`tune --apply: not applied, ${why}`, 1);
    }
    const note = [change.note!, '', `tune ${m}: ${proposal.message}`, ...formatWorksheet(proposal.worksheet, unit)].join('\n');
    const outcome = await machine.setCompensator(ref, proposal.blocks, { note, base: loop.revision, ...(change.author === undefined ? {} : { author: change.author }) });
    return show(ctx, p, proposal, title, unit, { applied: outcome, warnings: loop.warnings }, [...warnLines, '', 'applied:', ...outcomeLines(outcome, unit)]);
  });
}
