/** Query keys of the imports feature, below the federation's key. */
export const importsKey = (federation: string) => ['federations', federation, 'imports'] as const;
export const federationPath = (federation: string) => `/federations/${encodeURIComponent(federation)}`;
