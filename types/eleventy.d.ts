/** Minimal typing shim for the parts of @11ty/eleventy used by src/site/build-site.ts. */
declare module '@11ty/eleventy' {
  export interface EleventyUserConfigLike {
    addGlobalData(name: string, value: unknown): void;
    amendLibrary(engine: 'njk', amend: (env: { addFilter(name: string, filter: (...args: never[]) => unknown): void }) => void): void;
    [key: string]: unknown;
  }
  export interface EleventyOptions {
    configPath?: string;
    quietMode?: boolean;
    config?: (cfg: EleventyUserConfigLike) => void;
    [key: string]: unknown;
  }
  export default class Eleventy {
    constructor(input?: string, output?: string, options?: EleventyOptions);
    write(): Promise<unknown>;
    disableLogger(): void;
    toJSON(): Promise<Array<{ url: string; inputPath: string; outputPath: string; content: string }>>;
  }
}
