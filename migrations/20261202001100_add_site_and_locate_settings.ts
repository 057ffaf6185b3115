import type { Knex } from 'knex';

// What bids and the pre-dig checklist need from the company: the local frost depth, the
// tallest fence built without a permit per yard position, and how the one-call centre
// counts a locate ticket's wait and life in business days.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    /** inches; null when the company does not set one */
    t.decimal('frost_depth_in', 6, 2);
    /** inches; null = no limit set */
    t.decimal('permit_max_front_in', 6, 2);
    t.decimal('permit_max_side_in', 6, 2);
    t.decimal('permit_max_back_in', 6, 2);
    t.integer('locate_wait_business_days').notNullable().defaultTo(2);
    t.integer('locate_valid_days').notNullable().defaultTo(14);
    t.enum('locate_valid_basis', ['business', 'calendar']).notNullable().defaultTo('calendar');
    /** weekdays that count as business days, 0 = Sunday: "1,2,3,4,5" */
    t.string('business_days', 20).notNullable().defaultTo('1,2,3,4,5');
    /** JSON array of YYYY-MM-DD */
    t.text('holidays');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('company_settings', (t) => {
    for (const c of ['frost_depth_in', 'permit_max_front_in', 'permit_max_side_in', 'permit_max_back_in', 'locate_wait_business_days', 'locate_valid_days', 'locate_valid_basis', 'business_days', 'holidays']) t.dropColumn(c);
  });
}
