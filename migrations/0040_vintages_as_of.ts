import type { Knex } from 'knex';

/**
 * As-of queries (GET /series/:series/observations?asOf=…) ask for the latest vintage of a series
 * released on or before a date: an index on (series_id, as_of, number) answers that with one seek.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('vintages', (t) => {
    t.index(['series_id', 'as_of', 'number'], 'vintages_series_as_of');
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('vintages', (t) => {
    t.dropIndex(['series_id', 'as_of', 'number'], 'vintages_series_as_of');
  });
}
