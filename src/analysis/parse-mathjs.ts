import {
  createAccessorNode, createArrayNode, createAssignmentNode, createBlockNode, createConditionalNode, createConstantNode,
  createFunctionAssignmentNode, createFunctionNode, createIndexNode, createNode, createObjectNode, createOperatorNode,
  createParenthesisNode, createParse, createRangeNode, createRelationalNode, createSymbolNode,
} from 'mathjs';
import type { ExprNode } from './parse-columns.js';

/**
 * The mathjs expression parser, assembled from its own factories with only the node
 * classes it builds. The full mathjs instance spends ~150-300 ms on first use
 * setting up typed functions for evaluation, which the model walker never needs;
 * this assembly parses the same syntax, is ready in ~2 ms and bundles small.
 * Only `parse(string)` is called, so `typed` and `numeric` are reduced to that case.
 */

type Factory = (deps: Record<string, unknown>) => unknown;

// mathjs exports these factories but its type declarations omit them.
declare module 'mathjs' {
  export const createAccessorNode: Factory, createArrayNode: Factory, createAssignmentNode: Factory, createBlockNode: Factory;
  export const createConditionalNode: Factory, createConstantNode: Factory, createFunctionAssignmentNode: Factory;
  export const createFunctionNode: Factory, createIndexNode: Factory, createNode: Factory, createObjectNode: Factory;
  export const createOperatorNode: Factory, createParenthesisNode: Factory, createParse: Factory, createRangeNode: Factory;
  export const createRelationalNode: Factory, createSymbolNode: Factory;
}

/** Throws if a node tries to evaluate: we only read the tree. */
function unavailable(): never {
  throw new Error('evaluation is not available in the model parser');
}

/** Builds a parse(text) function from the mathjs factories. */
export function buildMathjsParser(): (text: string) => ExprNode {
  const typed = Object.assign(
    (_name: string, signatures: { string: (text: string) => ExprNode }) => (text: string) => signatures.string(text),
    { addConversion: () => undefined },
  );
  const math = {};
  const Node = createNode({ mathWithTransform: math });
  const SymbolNode = createSymbolNode({ math, Node });
  const deps = { Node, SymbolNode, math, typed, subset: unavailable, matrix: unavailable, ResultSet: unavailable, isBounded: unavailable, size: unavailable };
  const parse = createParse({
    AccessorNode: createAccessorNode(deps),
    ArrayNode: createArrayNode(deps),
    AssignmentNode: createAssignmentNode(deps),
    BlockNode: createBlockNode(deps),
    ConditionalNode: createConditionalNode(deps),
    ConstantNode: createConstantNode(deps),
    FunctionAssignmentNode: createFunctionAssignmentNode(deps),
    FunctionNode: createFunctionNode(deps),
    IndexNode: createIndexNode(deps),
    ObjectNode: createObjectNode(deps),
    OperatorNode: createOperatorNode(deps),
    ParenthesisNode: createParenthesisNode(deps),
    RangeNode: createRangeNode(deps),
    RelationalNode: createRelationalNode(deps),
    SymbolNode,
    typed,
    numeric: (s: string) => Number(s),
    config: { number: 'number' },
  });
  return parse as (text: string) => ExprNode;
}
