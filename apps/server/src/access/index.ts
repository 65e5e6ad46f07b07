export { ACTIONS, can, canAssignRole, roomAccess, type Action, type RoomAccess } from './policy.js';
export { roleIn, findDocument, isUuid } from './membership.js';
export { createRoomAuthorizer, type AuthorizerDeps } from './authorizer.js';
