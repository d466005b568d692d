import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { cli, ok, refused, storeCli, tempDir } from './run.js';

/**
 * Bad input of every kind: exit status 2, one line on stderr saying what and how
 * to fix it, nothing on stdout, and the store exactly as it was.
 */

let file = '';
let dir = '';
let run: ReturnType<typeof storeCli>;
let dumpFile = '';

beforeAll(async () => {
  // Not tempDir(): that one is emptied after each test, and this store serves them all.
  dir = fs.mkdtempSync(path.join(fs.realpathSync(process.env.TMPDIR ?? '/tmp'), 'loopledger-errors-'));
  file = path.join(dir, 'rig.loopledger.db');
  run = storeCli(file);
  ok(await run('init', '--units', 'hz'));
  ok(await run('axis', 'add', 'A'));
  ok(await run('loop', 'add', 'A/pos', '--plant', '400/(s*(s+20))'));
  ok(await run('spec', 'A/pos', 'pm>=45'));
  ok(await run('comp', 'set', 'A/pos', 'gain:0.8'));
  dumpFile = path.join(dir, 'dump.json');
  ok(await run('dump', '-o', dumpFile));
  return () => fs.rmSync(dir, { recursive: true, force: true });
});

const CASES: [string, string[], RegExp][] = [
  ['unknown command', ['frobnicate'], /unknown command 'frobnicate'/],
  ['unknown option', ['check', '--frob'], /check: unknown option '--frob'/],
  ['option without its value', ['log', 'A/pos', '--json', '-m'], /unknown option|needs a value/],
  ['missing argument', ['log'], /log: missing the loop name/],
  ['extra argument', ['log', 'A/pos', 'extra'], /unexpected argument 'extra'/],
  ['malformed loop name', ['log', 'nonsense'], /'nonsense' is not a loop name; write AXIS\/LOOP/],
  ['unknown loop', ['log', 'A/nope'], /no loop 'A\/nope'/],
  ['unknown axis', ['check', 'Q/pos'], /no axis 'Q'/],
  ['unknown subcommand', ['comp', 'frob'], /comp: unknown subcommand 'frob'/],
  ['unparsable plant', ['loop', 'add', 'A/vel', '--plant', '1/(s+'], /plant/],
  ['improper plant', ['loop', 'add', 'A/vel', '--plant', 's^2/(s+1)'], /improper|more zeros than poles|proper/],
  ['loop without plant', ['loop', 'add', 'A/vel'], /--plant EXPR/],
  ['loop that exists', ['loop', 'add', 'A/pos', '--plant', '1/s'], /already/],
  ['missing inner loop', ['loop', 'add', 'A/vel', '--plant', '1/s', '--inner', 'A/zzz'], /A\/zzz/],
  ['bad sample rate', ['loop', 'add', 'A/vel', '--plant', '1/s', '--sample-rate', 'fast'], /--sample-rate/],
  ['lead written backwards', ['comp', 'set', 'A/pos', 'lead:150Hz/30Hz'], /zero below its pole/],
  ['unknown block', ['comp', 'set', 'A/pos', 'wobble:3'], /unknown block kind 'wobble'/],
  ['no blocks', ['comp', 'set', 'A/pos'], /at least one BLOCK/],
  ['unparsable expr block', ['comp', 'set', 'A/pos', 'expr:(s+1'], /compensator/],
  ['bad requirement', ['spec', 'A/pos', 'pm>45'], /METRIC>=VALUE/],
  ['no requirements', ['spec', 'A/pos'], /at least one requirement/],
  ['requirements and --drop', ['spec', 'A/pos', 'pm>=45', '--drop', 'pm'], /not both/],
  ['drop what is not there', ['spec', 'A/pos', '--drop', 'os'], /no requirement 'os'/],
  ['one metric twice', ['spec', 'A/pos', 'pm>=45', 'pm>=50'], /two requirements for pm>=/],
  ['stale base revision', ['comp', 'set', 'A/pos', 'gain:2', '--base', '2'], /conflict: A\/pos has changed since revision 2: revision 3 was saved by/],
  ['--force without --base', ['comp', 'set', 'A/pos', 'gain:2', '--force'], /--force only makes sense with --base/],
  ['base not a number', ['comp', 'set', 'A/pos', 'gain:2', '--base', 'two'], /'two' is not a revision number/],
  ['empty author', ['comp', 'set', 'A/pos', 'gain:2', '--author', ''], /--author needs a name/],
  ['revision that does not exist', ['diff', 'A/pos', '1', '9'], /no revision 9; its revisions are 1 to 3/],
  ['revision zero', ['diff', 'A/pos', '0', '1'], /'0' is not a revision number/],
  ['revert without a note', ['revert', 'A/pos', '1'], /say why with -m NOTE/],
  ['revert to nowhere', ['revert', 'A/pos', '7', '-m', 'x'], /no revision 7/],
  ['drop the last variant', ['plant', 'drop', 'A/pos', 'nominal'], /only plant variant/],
  ['bad variant name', ['plant', 'set', 'A/pos', '1/(s+1)', '--variant', 'no good'], /variant name 'no good' is not allowed/],
  ['axis that exists', ['axis', 'add', 'A'], /axis 'A' already exists/],
  ['bad axis name', ['axis', 'add', 'bad/name'], /axis name 'bad\/name' is not allowed/],
  ['init over a store', ['init'], /already a loopledger store/],
  ['unknown unit', ['init', '--units', 'deg'], /--units 'deg' is not known; use hz or rad/],
  ['load a missing file', ['load', 'no-such-dump.json'], /cannot read no-such-dump\.json/],
  ['dump to a missing directory', ['dump', '-o', '/no/such/dir/x.json'], /dump: cannot write/],
];

describe('bad input is refused and changes nothing', () => {
  it.each(CASES)('%s', async (_name, args, message) => {
    const before = ok(await run('dump'));
    const line = refused(await run(...args));
    expect(line).toMatch(/^loopledger: /);
    expect(line).toMatch(message);
    expect(ok(await run('dump'))).toBe(before);
  });

  it('loading into a store that holds a machine', async () => {
    const before = ok(await run('dump'));
    expect(refused(await run('load', dumpFile))).toMatch(/load into a new or empty store/);
    expect(ok(await run('dump'))).toBe(before);
  });
});

describe('bad stores are refused and left alone', () => {
  it('a missing store is not created', async () => {
    const d = tempDir();
    const missing = path.join(d, 'none.db');
    expect(refused(await cli('--store', missing, 'check'))).toMatch(/no store at .*none\.db; create one with 'loopledger init'/);
    expect(fs.readdirSync(d)).toEqual([]);
  });

  it('a file that is not a store keeps its bytes, and gets no companions', async () => {
    const d = tempDir();
    const foreign = path.join(d, 'notes.txt');
    fs.writeFileSync(foreign, 'shopping list\n');
    for (const args of [['check'], ['loop', 'list'], ['axis', 'add', 'X'], ['init'], ['demo']]) {
      refused(await cli('--store', foreign, ...args));
      expect(fs.readFileSync(foreign, 'utf8')).toBe('shopping list\n');
      expect(fs.readdirSync(d)).toEqual(['notes.txt']);
    }
  });

  it('a store in a directory that does not exist', async () => {
    const d = tempDir();
    for (const args of [['init'], ['demo'], ['load', 'x.json']]) {
      expect(refused(await cli('--store', path.join(d, 'no', 'such', 'dir', 'm.db'), ...args))).toMatch(/directory .* does not exist/);
    }
    expect(fs.readdirSync(d)).toEqual([]);
  });

  it('a refused load leaves no store behind', async () => {
    const d = tempDir();
    const target = path.join(d, 'new.db');
    const broken = path.join(d, 'broken.json');
    fs.writeFileSync(broken, '{"format": "loopledger-machine", "axes": ');
    expect(refused(await cli('--store', target, 'load', broken))).toMatch(/not valid JSON/);
    const wrong = path.join(d, 'wrong.json');
    fs.writeFileSync(wrong, '{"hello": "world"}\n');
    refused(await cli('--store', target, 'load', wrong));
    expect(fs.readdirSync(d).sort()).toEqual(['broken.json', 'wrong.json']);
  });
});
