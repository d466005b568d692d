import type { Block } from '../model/blocks.js';
import type { TransferFunction } from '../model/tf.js';
import { shapeOf, withBlocks } from './shape.js';
import type { DesignVariant } from './types.js';

/** A plant variant prepared for design: the plant in series with the blocks that are kept. */
export function makeDesignVariant(name: string, plant: TransferFunction, kept: readonly Block[] = []): DesignVariant {
  const plantShape = shapeOf(plant);
  const l = withBlocks({ tf: plant, shape: plantShape }, kept);
  return { name, tf: l.tf, shape: l.shape, plant: plantShape };
}
