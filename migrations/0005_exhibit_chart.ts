import type { Knex } from 'knex';

/** Which chart an exhibit drawn from a single study shows: the cycle (the gap) or the series with its trend. */
export async function up(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.string('chart_kind', 16).notNullable().defaultTo('cycle');
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.dropColumn('chart_kind');
  });
}
