import type { Block } from '../model/blocks.js';
import type { TransferFunction } from '../model/tf.js';
import { tfSeries } from '../analysis/tf.js';
import { compensatorTf } from './blocks-tf.js';
import { shapeOf, shapeWithBlocks } from './shape.js';
import type { DesignVariant } from './types.js';

/** A plant variant prepared for design: the plant in series with the blocks that are kept. */
export function makeDesignVariant(name: string, plant: TransferFunction, kept: readonly Block[] = []): DesignVariant {
  const tf = tfSeries(compensatorTf({ blocks: kept }), plant);
  const plantShape = shapeOf(plant);
  return { name, tf, shape: kept.length === 0 ? plantShape : shapeWithBlocks(plantShape, kept), plant: plantShape };
}
