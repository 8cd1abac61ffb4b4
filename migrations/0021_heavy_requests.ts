import type { Knex } from 'knex';

/** Heavy requests (large decompositions) per account, for the per-account budget (services/heavy.ts). */
export async function up(knex: Knex) {
  await knex.schema.createTable('heavy_requests', (t) => {
    t.bigIncrements('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.integer('units').unsigned().notNullable();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['user_id', 'at']);
  });
}

export async function down(knex: Knex) {
  await knex.schema.dropTableIfExists('heavy_requests');
}
