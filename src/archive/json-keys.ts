/**
 * Duplicate keys in a JSON text: the scanner lives in src/study/json-keys.ts (the study manifest
 * uses it too, and src/study/ sits below src/archive/); re-exported here for the archive.
 */
export { findDuplicateKeys, pointerToken, type DuplicateKey } from '../study/json-keys.js';
