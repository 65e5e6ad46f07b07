export { createSessionService, type SessionService, type SessionUser, type ValidSession } from './sessions.js';
export { hashPassword, verifyPassword, spendVerifyTime, MIN_PASSWORD_LENGTH, MAX_PASSWORD_LENGTH } from './passwords.js';
export { generateSessionToken, sessionIdFromToken } from './tokens.js';
export { SESSION_COOKIE, sessionCookie, clearedSessionCookie, readSessionToken } from './cookies.js';
export { createRateLimiter, type RateLimiter } from './rate-limit.js';
export { isAllowedOrigin, type OriginRequest } from './origin.js';
