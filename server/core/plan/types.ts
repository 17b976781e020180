/** The engine's plan types live in shared/ so the client's floor map draws the same shapes the engine routes on. */
export * from '../../../shared/plan-geometry';
