export { noRelay } from './no-relay.js';
export { createRedisRelay, RelayError, type RedisRelay, type RedisRelayOptions } from './redis-relay.js';
