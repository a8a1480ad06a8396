/** The tool's version, from package.json (one source of truth). */
import pkg from '../package.json' with { type: 'json' };

export const TOOL_VERSION: string = pkg.version;
