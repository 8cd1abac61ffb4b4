import type { Knex } from 'knex';

/** Saved decompositions. `vintage_number` NULL means "latest": the study follows new loads. */
export async function up(knex: Knex) {
  await knex.schema.createTable('studies', (t) => {
    t.increments('id').primary();
    t.integer('owner_id').unsigned().notNullable().references('users.id').onDelete('RESTRICT');
    t.integer('series_id').unsigned().notNullable().references('series.id').onDelete('RESTRICT');
    t.integer('vintage_number').unsigned().nullable();
    t.string('transform', 8).notNullable();
    t.string('method', 32).notNullable();
    t.text('params').notNullable();
    t.string('title', 200).notNullable();
    t.text('notes').nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['owner_id']);
    t.index(['series_id']);
  });
}

export async function down(knex: Knex) {
  await knex.schema.dropTableIfExists('studies');
}
