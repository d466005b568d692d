import { UserError } from '../model/errors.js';

const NAME_RE = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,39}$/;

/** Checks an axis, loop or variant name; `what` says which, for the message. */
export function checkName(name: string, what: string): string {
  if (!NAME_RE.test(name)) {
    throw new UserError(`${what} name '${name}' is not allowed; use up to 40 letters, digits, '_', '-', '.', starting with a letter or digit`);
  }
  return name;
}

/** "X/pos" -> { axis: "X", loop: "pos" }; the error says how to write it. */
export function parseLoopRef(ref: string): { axis: string; loop: string } {
  const parts = ref.split('/');
  if (parts.length !== 2 || parts[0] === '' || parts[1] === '') {
    throw new UserError(`'${ref}' is not a loop name; write AXIS/LOOP, e.g. X/pos`);
  }
  return { axis: checkName(parts[0]!, 'axis'), loop: checkName(parts[1]!, 'loop') };
}

/** The "AXIS/LOOP" form. */
export function loopRef(axis: string, loop: string): string {
  return `${axis}/${loop}`;
}
