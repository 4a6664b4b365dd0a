import { RefreshToken } from './RefreshToken.js';
import { SignInAudit } from './SignInAudit.js';
import { SignInLink } from './SignInLink.js';
import { User } from './User.js';

/** Every entity the data source knows; migrations create their tables. */
export const entities = [User, RefreshToken, SignInLink, SignInAudit];
export { RefreshToken, SignInAudit, SignInLink, User };
