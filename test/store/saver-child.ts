// A second engineer in another process: saves compensator revisions to one loop
// and reports each save on stdout the moment it has landed (after commit).
// Usage: node --import tsx saver-child.ts STORE LOOP COUNT based|latest AUTHOR
import { ConflictError, openMachine } from '../../src/engine/index.js';

const [file, ref, countText, mode, author] = process.argv.slice(2) as [string, string, string, string, string];
const m = openMachine(file, { author });
let base = m.loopInfo(ref).head.number;
for (let i = 0; i < Number(countText); i++) {
  const gain = 1 + ((i * 7) % 13) / 10;
  try {
    const o = await m.setCompensator(ref, [`gain:${gain}`], mode === 'based' ? { base, note: `${author} ${i}` } : { note: `${author} ${i}` });
    base = o.revision.number;
    process.stdout.write(`landed ${o.revision.number}\n`);
  } catch (e) {
    if (!(e instanceof ConflictError)) throw e;
    process.stdout.write(`conflict ${e.head}\n`);
    base = m.loopInfo(ref).head.number; // read again, as a user would, and go on
  }
}
m.close();
