import type { DemoSeeder } from './demo';

/** Demo content beyond users and the site, in order; each domain appends its seeder here. */
export const demoSeeders: DemoSeeder[] = [];
