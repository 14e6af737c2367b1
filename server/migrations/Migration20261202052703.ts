import { Migration } from '@mikro-orm/migrations';

export class Migration20261202052703 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create index `assessments_computed_at_index` on `assessments` (`computed_at`)");
    this.addSql("create index `structures_updated_at_index` on `structures` (`updated_at`)");
  }
}
