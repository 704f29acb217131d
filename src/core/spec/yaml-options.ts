/**
 * How every spec text is read (YAML 1.2, strict, duplicate keys kept for their own finding, `<<`
 * merge keys honoured). logLevel 'error': the core prints nothing (the yaml package would warn on
 * stderr, e.g. about collection keys); what matters comes back as findings.
 */
export const YAML_OPTIONS = {
  uniqueKeys: false, merge: true, prettyErrors: false, strict: true, version: '1.2', resolveKnownTags: false, logLevel: 'error',
} as const;
