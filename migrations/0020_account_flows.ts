import type { Knex } from 'knex';

/**
 * Account flows (issue 17): a reset link can be revoked (a newer link used, a password changed,
 * the account deactivated), and reset requests are counted per address and per e-mail.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('password_resets', (t) => {
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.index(['user_id', 'used_at']);
  });
  await knex.schema.createTable('password_reset_requests', (t) => {
    t.bigIncrements('id').primary();
    t.string('email', 254).notNullable();
    t.string('ip', 64).notNullable();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['email', 'at']);
    t.index(['ip', 'at']);
  });
  // Sign-in limits per account and address (services/auth.ts signInThrottle).
  await knex.schema.alterTable('sign_in_attempts', (t) => {
    t.index(['email', 'ip', 'at']);
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('sign_in_attempts', (t) => {
    t.dropIndex(['email', 'ip', 'at']);
  });
  await knex.schema.dropTableIfExists('password_reset_requests');
  await knex.schema.alterTable('password_resets', (t) => {
    t.dropIndex(['user_id', 'used_at']);
    t.dropColumn('revoked_at');
  });
}
