/** The content model (schemas, pure parsers, merge) and its loader. Import from here. */
export * from './schema.ts';
export * from './semver.ts';
export * from './yaml.ts';
export * from './csv.ts';
export * from './tables.ts';
export * from './issues.ts';
export * from './documents.ts';
export * from './resolve.ts';
export * from './types.ts';
export * from './source-schema.ts';
export { loadContent, loadInstrumentFile, loadSourceFile } from './load.ts';
