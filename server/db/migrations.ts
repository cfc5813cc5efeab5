/**
 * The ordered list of migrations the Migrator runs (explicit, so it works the same under tsx, vitest and
 * a bundle). Append new ones at the end; never edit one that has shipped.
 */
import type { MigrationObject } from '@mikro-orm/core';
import { Migration20261202000000Foundation } from '../migrations/Migration20261202000000_foundation';
import { Migration20261202024511Corpora } from '../migrations/Migration20261202024511_corpora';
import { Migration20261202024709Runs } from '../migrations/Migration20261202024709_runs';
import { Migration20261202033904EvaluationsGridsReports } from '../migrations/Migration20261202033904_evaluations_grids_reports';
import { Migration20261205093700HWordOrderIndex } from '../migrations/Migration20261205093700_h_word_order_index';
import { Migration20261205102200RunnersB } from '../migrations/Migration20261205102200_runners_b';
import { Migration20261205103000SettingsKeysG } from '../migrations/Migration20261205103000_settings_keys_g';
import { Migration20261205114500H2LeanWordIndexes } from '../migrations/Migration20261205114500_h2_lean_word_indexes';
import { Migration20261205150000EEvaluationRequests } from '../migrations/Migration20261205150000_e_evaluation_requests';

export const migrationsList: MigrationObject[] = [
  { name: 'Migration20261202000000_foundation', class: Migration20261202000000Foundation },
  { name: 'Migration20261202024511_corpora', class: Migration20261202024511Corpora },
  { name: 'Migration20261202024709_runs', class: Migration20261202024709Runs },
  { name: 'Migration20261202033904_evaluations_grids_reports', class: Migration20261202033904EvaluationsGridsReports },
  { name: 'Migration20261205093700_h_word_order_index', class: Migration20261205093700HWordOrderIndex },
  { name: 'Migration20261205102200_runners_b', class: Migration20261205102200RunnersB },
  { name: 'Migration20261205103000_settings_keys_g', class: Migration20261205103000SettingsKeysG },
  { name: 'Migration20261205114500_h2_lean_word_indexes', class: Migration20261205114500H2LeanWordIndexes },
  { name: 'Migration20261205150000_e_evaluation_requests', class: Migration20261205150000EEvaluationRequests },
];
