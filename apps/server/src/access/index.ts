export { ACTIONS, can, canAssignRole, documentAccess, roomAccess, type Action, type DocumentAccess, type RoomAccess } from './policy.js';
export { decideDocument, openRoundOfText, roundFacts, roundsForDocument, type DocRounds, type RoundFacts } from './rounds.js';
export { roleIn, findDocument } from './membership.js';
export { isUuid } from '../ids.js';
export { createRoomAuthorizer, type AuthorizerDeps } from './authorizer.js';
