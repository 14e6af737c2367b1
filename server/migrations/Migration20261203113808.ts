import { Migration } from '@mikro-orm/migrations';

export class Migration20261203113808 extends Migration {
  override async up(): Promise<void> {
    this.addSql("alter table `drone_profiles` add column `cruise_power_w` double not null default 300");
    this.addSql("alter table `drone_profiles` add column `perch_manoeuvre_wh` double not null default 3");
    this.addSql("alter table `drone_profiles` add column `charge_efficiency` double not null default 0.95");
    this.addSql("alter table `drone_profiles` add column `charge_to_percent` double not null default 100");
  }
}
