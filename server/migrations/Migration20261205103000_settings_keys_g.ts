import { Migration } from '@mikro-orm/migrations';

/**
 * One spelling of the model settings for every family (shared/model/settings-keys.ts): the GRU's `embedSize`
 * and `obsHidden` become `embeddingSize` and `observationHidden` in the stored run settings (`runs.settings.model`)
 * and grid base settings (`grids.base_settings.model`), and in grid axis keys (`model.embedSize` …).
 * Rows that already use the new keys are left as they are.
 */
const RENAMES: [string, string][] = [['embedSize', 'embeddingSize'], ['obsHidden', 'observationHidden']];

function renameIn(table: string, column: string, from: string, to: string): string {
  const oldPath = `'$.model.${from}'`;
  const newPath = `'$.model.${to}'`;
  return `update \`${table}\` set \`${column}\` = json_remove(json_set(\`${column}\`, ${newPath}, json_extract(\`${column}\`, ${oldPath})), ${oldPath}) ` +
    `where json_type(\`${column}\`, ${oldPath}) is not null and json_type(\`${column}\`, ${newPath}) is null;`;
}

function renameAxes(from: string, to: string): string {
  return `update \`grids\` set \`axes\` = replace(\`axes\`, '"model.${from}"', '"model.${to}"') where \`axes\` like '%"model.${from}"%';`;
}

export class Migration20261205103000SettingsKeysG extends Migration {
  override async up(): Promise<void> {
    for (const [from, to] of RENAMES) {
      this.addSql(renameIn('runs', 'settings', from, to));
      this.addSql(renameIn('grids', 'base_settings', from, to));
      this.addSql(renameAxes(from, to));
    }
  }

  override async down(): Promise<void> {
    for (const [from, to] of RENAMES) {
      this.addSql(`${renameIn('runs', 'settings', to, from).slice(0, -1)} and \`family\` = 'gru';`);
      this.addSql(`${renameIn('grids', 'base_settings', to, from).slice(0, -1)} and \`family\` = 'gru';`);
      this.addSql(renameAxes(to, from));
    }
  }
}
