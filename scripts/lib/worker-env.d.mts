// Types for the TypeScript worker benchmark.
export function workerRunEnv(env: NodeJS.ProcessEnv): NodeJS.ProcessEnv;
