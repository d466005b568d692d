/**
 * Source columns for expression-tree nodes. The mathjs tree carries no positions,
 * so we tokenise the text ourselves: its leaves (numbers, names, quoted strings)
 * appear in the same left-to-right order as a pre-order walk of the tree meets
 * them. Every node gets the 1-based column of its first leaf. When the two
 * sequences disagree (an exotic token) we give no columns rather than wrong ones.
 */

/** The few fields of a mathjs node that the model walker reads. */
export interface ExprNode {
  readonly type: string;
  readonly value?: unknown;
  readonly name?: string;
  readonly op?: string;
  /** Operator name (OperatorNode) or the called symbol node (FunctionNode). */
  readonly fn?: unknown;
  readonly args?: readonly ExprNode[];
  readonly content?: ExprNode;
}

const NUMBER = /0[xob][0-9a-f]+|(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?/iy;
const NAME = /[\p{L}_$][\p{L}\p{N}_$]*/uy;

/** 1-based columns of the leaf tokens of `text`, in order. */
function leafTokenColumns(text: string): number[] {
  const cols: number[] = [];
  let i = 0;
  while (i < text.length) {
    const ch = text[i]!;
    if (/\s/.test(ch)) { i++; continue; }
    if (ch === '"' || ch === "'") {
      cols.push(i + 1);
      const close = text.indexOf(ch, i + 1);
      i = close < 0 ? text.length : close + 1;
      continue;
    }
    let m: RegExpExecArray | null = null;
    for (const re of [NUMBER, NAME]) {
      re.lastIndex = i;
      m = re.exec(text);
      if (m) break;
    }
    if (m) {
      cols.push(i + 1);
      i += m[0].length;
    } else i++;
  }
  return cols;
}

/** Children of a node in source order (function name counts as a leaf of its own node). */
function children(n: ExprNode): readonly ExprNode[] {
  if (n.type === 'ParenthesisNode' && n.content) return [n.content];
  if (n.type === 'ArrayNode') return ((n as unknown as { items?: ExprNode[] }).items ?? []);
  return n.args ?? [];
}

/** Maps each node of the tree to the 1-based column of its first leaf. */
export function leafColumns(text: string, root: ExprNode): Map<ExprNode, number> {
  const tokens = leafTokenColumns(text);
  const first = new Map<ExprNode, number>();
  let next = 0;
  let ok = true;
  const visit = (n: ExprNode): number | undefined => {
    let mine: number | undefined;
    const isLeaf = n.type === 'ConstantNode' || n.type === 'SymbolNode' || n.type === 'FunctionNode';
    if (isLeaf) {
      if (next >= tokens.length) ok = false;
      mine = tokens[next++];
    }
    for (const c of children(n)) {
      const col = visit(c);
      if (mine === undefined) mine = col;
    }
    if (mine !== undefined) first.set(n, mine);
    return mine;
  };
  visit(root);
  return ok && next === tokens.length ? first : new Map();
}
