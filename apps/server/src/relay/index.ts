export { noRelay } from './no-relay.js';
export { createMemoryRelayHub, type MemoryRelayHub } from './memory-relay.js';
export { createRedisRelay, RelayError, type RedisRelay, type RedisRelayOptions } from './redis-relay.js';
