// Types of scripts/test-setup.mjs for the tests that import it.
export declare const PACKAGE_LIST: string;
export declare function readPackageList(text: string): string[];
export declare function installCommand(missing: string[]): string;
export interface SetUpResult { ok: boolean; missing: string[]; installed: string[]; message: string }
export declare function setUp(options: {
  packages: string[];
  isRoot: boolean;
  env?: NodeJS.ProcessEnv;
  log?: (line: string) => void;
}): SetUpResult;
