import type { Knex } from 'knex';

/**
 * Release alerts survive a crash: a load writes the job of its alerts in the transaction that
 * stores its vintages, and the job is marked done once its mails are sent. A server that stops
 * between the two leaves the job for the next sweep (services/alerts/outbox.ts).
 */
export async function up(knex: Knex) {
  await knex.schema.createTable('alert_jobs', (t) => {
    t.increments('id').primary();
    t.text('payload').notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.string('claimed_by', 80).nullable();
    t.datetime('claimed_until', { precision: 3 }).nullable();
    t.integer('attempts').unsigned().notNullable().defaultTo(0);
    t.string('last_error', 500).nullable();
    t.datetime('done_at', { precision: 3 }).nullable();
    t.index(['done_at', 'claimed_until'], 'alert_jobs_due');
  });
}

export async function down(knex: Knex) {
  await knex.schema.dropTable('alert_jobs');
}
