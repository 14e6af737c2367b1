import { Migration } from '@mikro-orm/migrations';
import { ACSR_CONDUCTORS } from '../../shared/engineering/conductors.ts';
import { DEFAULT_HAZARD_KINDS } from '../modules/inventory/catalogues.ts';

const str = (s: string) => `'${s.replace(/'/g, "''")}'`;
const num = (n: number | undefined) => (n === undefined || !Number.isFinite(n) ? 'null' : String(n));

// Fills the conductor catalogue (ACSR sizes) and the starting hazard catalogue on every new database, demo or not.
export class Migration20261202034000 extends Migration {
  override async up(): Promise<void> {
    for (const c of ACSR_CONDUCTORS) {
      this.addSql(
        'insert or ignore into `conductor_types` (`code_word`, `size`, `stranding`, `material`, `diameter_mm`, `resistance_dc20ohm_per_m`, `resistance_ac25ohm_per_m`, `resistance_ac75ohm_per_m`, `weight_kg_per_m`) values ' +
          `(${str(c.codeWord)}, ${str(c.size)}, ${str(c.stranding)}, ${str(c.family)}, ${num(c.diameterMm)}, ${num(c.resistanceDc20OhmPerM)}, ${num(c.resistanceAc25OhmPerM)}, ${num(c.resistanceAc75OhmPerM)}, ${num(c.weightKgPerM)})`,
      );
    }
    for (const k of DEFAULT_HAZARD_KINDS) {
      this.addSql(`insert or ignore into \`hazard_kinds\` (\`id\`, \`label\`, \`default_severity\`, \`active\`) values (${str(k.id)}, ${str(k.label)}, ${str(k.defaultSeverity)}, 1)`);
    }
  }
}
