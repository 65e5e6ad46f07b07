/** The server as a library: for the CLI, benchmarks and tests. */
export { startServer, type RunningServer, type StartOptions } from './server.js';
export { loadConfig, type ServerConfig } from './config.js';
export { createLogger, type Logger } from './logger.js';
export { seedDemo, type SeedResult } from './demo/seed.js';
export * as admin from './admin/index.js';
export { printSetupCode } from './print-setup-code.js';
export * as exchange from './exchange/index.js';
export { createPgUpdateStore } from './store/index.js';
