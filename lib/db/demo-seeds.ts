/**
 * Registers the demo seed hooks of each feature (tallies, scenarios, …). Import a feature's
 * `*-demo.ts` here; each calls `addDemoSeedHook` from ./seed.
 */
import './tallies-demo';

export {};
