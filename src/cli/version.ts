import pkg from '../../package.json';

export const VERSION: string = pkg.version;
export const DOCS_URL = 'https://github.com/qpoint-dev/qpoint/blob/main/docs/findings.md';
