// Types for the TypeScript benchmarks that start the project's own cluster.
export function startPostgres(): string;
export const PG_PORT: number;
