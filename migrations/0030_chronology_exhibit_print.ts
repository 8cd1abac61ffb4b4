import type { Knex } from 'knex';

/**
 * Issue 14: the reference chronology (an institution's dated peaks and troughs per economy or
 * area), and what exhibits need to print: their number ("Chart 3") and the chronology they shade.
 */
export async function up(knex: Knex) {
  await knex.schema.createTable('chronologies', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable();
    t.string('area', 80).notNullable();
    t.text('notes').nullable();
    t.integer('updated_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(['name']);
  });
  await knex.schema.createTable('chronology_turns', (t) => {
    t.integer('chronology_id').unsigned().notNullable().references('chronologies.id').onDelete('CASCADE');
    t.string('period', 8).notNullable();
    t.string('type', 8).notNullable();
    t.primary(['chronology_id', 'period']);
  });
  await knex.schema.alterTable('exhibits', (t) => {
    t.string('number_label', 40).nullable();
    t.integer('chronology_id').unsigned().nullable().references('chronologies.id').onDelete('SET NULL');
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.dropForeign(['chronology_id']);
    t.dropColumn('chronology_id');
    t.dropColumn('number_label');
  });
  await knex.schema.dropTableIfExists('chronology_turns');
  await knex.schema.dropTableIfExists('chronologies');
}
