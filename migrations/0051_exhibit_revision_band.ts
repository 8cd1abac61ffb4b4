import type { Knex } from 'knex';

/**
 * An exhibit option: the band of past revisions drawn around the latest end-of-sample estimates
 * of a single-method study's cycle, with its note (not a forecast). Off for existing exhibits.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.boolean('revision_band').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.dropColumn('revision_band');
  });
}
