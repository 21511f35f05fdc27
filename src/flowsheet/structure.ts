/**
 * Structural checks before solving: whether a steady state can exist at all.
 */
import type { DiagnosticBag } from '../diagnostics.js';
import type { Model } from './model.js';

export function checkStructure(model: Model, bag: DiagnosticBag): void {
  void model;
  void bag;
}
