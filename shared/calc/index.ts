/**
 * Holdline's computation core: pure functions in SI units with the unit in every name, each
 * result carrying the rule it applied. Runs unchanged in the browser and on the server.
 */
export * from './errors';
export * from './units';
export * from './reeving';
export * from './rope';
export * from './slings';
export * from './chart';
export * from './assist';
export * from './ground';
export * from './wind';
export * from './site';
export * from './boom';
