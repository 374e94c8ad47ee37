// Types for the TypeScript benchmarks that start the project's own cluster.
export const PG_PORT: number;
export function startPostgres(): string;
