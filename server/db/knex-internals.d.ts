/** Knex's PostgreSQL column compiler (no published types); dialect.ts widens its float column. */
declare module 'knex/lib/dialects/postgres/schema/pg-columncompiler.js' {
  const ColumnCompilerPg: { prototype: Record<string, unknown> };
  export default ColumnCompilerPg;
}
