/**
 * Perpend's kernel bridge: lists, reads and writes numpy arrays in a live Python kernel.
 * (Full usage notes for the panel are in the TSDoc below each export.)
 */
export * from './bridge';
export * from './errors';
export { COMM_TARGET, HELPER_MODULE, HELPER_VERSION } from './helper';
export * from './ledger';
export * from './names';
export * from './parsers';
export { decodeBase64Into, encodeBase64, base64DecodedLength } from './base64';
