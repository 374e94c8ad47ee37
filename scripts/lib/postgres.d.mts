// Types for the TypeScript benchmarks that start the project's own cluster.
export function startPostgres(): string;
/** The port of this clone's cluster (.data/pg-port). */
export const PG_PORT: number;
