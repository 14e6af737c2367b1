import { Migration } from '@mikro-orm/migrations';

export class Migration20261203180000 extends Migration {
  override async up(): Promise<void> {
    // Every lookup by span is served by the unique (span, harvester, drone) index: one index fewer to write per row.
    this.addSql('drop index if exists "assessments_span_id_index"');
  }
}
