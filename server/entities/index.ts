import { User } from './User.js';

/** Every entity the data source knows; migrations create their tables. */
export const entities = [User];
export { User };
