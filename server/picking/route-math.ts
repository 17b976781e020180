/**
 * Walking figures for trips being picked, on the plan's shortest-path distances: the order the
 * remaining stops should follow after "Skip for now", metres actually walked, and metres still to go.
 * They are the site model's walk functions (server/core/site/walk.ts); this module names them for the
 * picking side.
 */
export { closedWalkMetres, remainingMetres, resequenceFree, RESEQUENCE_BUDGET_MS, type Distance } from '../core/site/walk';
