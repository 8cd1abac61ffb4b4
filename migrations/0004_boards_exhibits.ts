import type { Knex } from 'knex';

/** Boards of panels; exhibits with their frozen revisions and the events of their review. */
export async function up(knex: Knex) {
  await knex.schema.createTable('boards', (t) => {
    t.increments('id').primary();
    t.integer('owner_id').unsigned().notNullable().references('users.id').onDelete('RESTRICT');
    t.string('title', 200).notNullable();
    t.text('description').nullable();
    t.enu('visibility', ['private', 'team']).notNullable().defaultTo('team');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('board_panels', (t) => {
    t.increments('id').primary();
    t.integer('board_id').unsigned().notNullable().references('boards.id').onDelete('CASCADE');
    t.integer('position').notNullable();
    t.tinyint('width').notNullable().defaultTo(1);
    t.string('height', 2).notNullable().defaultTo('m');
    t.string('title', 200).notNullable();
    t.text('notes').nullable();
    t.string('kind', 16).notNullable();
    t.text('study_ids').notNullable();
    t.string('compare_by', 16).nullable();
    t.text('vintages').nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['board_id', 'position']);
  });
  await knex.schema.createTable('exhibits', (t) => {
    t.increments('id').primary();
    t.integer('author_id').unsigned().notNullable().references('users.id').onDelete('RESTRICT');
    t.integer('study_id').unsigned().nullable().references('studies.id').onDelete('SET NULL');
    t.integer('panel_id').unsigned().nullable().references('board_panels.id').onDelete('SET NULL');
    t.string('title', 200).notNullable();
    t.string('subtitle', 300).nullable();
    t.string('units', 120).nullable();
    t.string('source_line', 300).nullable();
    t.text('notes').nullable();
    t.string('status', 16).notNullable().defaultTo('draft').index();
    t.integer('revision').notNullable().defaultTo(0);
    t.string('public_slug', 32).nullable().unique();
    t.datetime('submitted_at', { precision: 3 }).nullable();
    t.datetime('published_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('exhibit_revisions', (t) => {
    t.increments('id').primary();
    t.integer('exhibit_id').unsigned().notNullable().references('exhibits.id').onDelete('CASCADE');
    t.integer('number').notNullable();
    t.specificType('snapshot', 'LONGTEXT').notNullable();
    t.specificType('checksum', 'CHAR(64)').notNullable();
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(['exhibit_id', 'number']);
  });
  await knex.schema.createTable('exhibit_events', (t) => {
    t.increments('id').primary();
    t.integer('exhibit_id').unsigned().notNullable().references('exhibits.id').onDelete('CASCADE');
    t.integer('actor_id').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.string('from_status', 16).nullable();
    t.string('to_status', 16).notNullable();
    t.text('comment').nullable();
    t.integer('revision').nullable();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['exhibit_id', 'at']);
  });
}

export async function down(knex: Knex) {
  for (const table of ['exhibit_events', 'exhibit_revisions', 'exhibits', 'board_panels', 'boards']) {
    await knex.schema.dropTableIfExists(table);
  }
}
