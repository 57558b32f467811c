// Vitest stands in this empty module for "server-only", so tests may import server code.
export {};
