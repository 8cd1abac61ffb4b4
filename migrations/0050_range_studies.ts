import type { Knex } from 'knex';

/**
 * A study is of kind "single" (one method and its parameters, as before) or "range" (the range of
 * gap estimates across several methods: `methods` holds the JSON list of {method, params}, and
 * `method` holds the word "range"). Existing studies become "single" and are otherwise unchanged.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.string('kind', 8).notNullable().defaultTo('single');
    t.text('methods').nullable();
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.dropColumn('methods');
    t.dropColumn('kind');
  });
}
