/**
 * One spelling for the model settings of every family: `embeddingSize` and `observationHidden`. GRU settings
 * were once stored as `embedSize` and `obsHidden`; checkpoints written then still load (the reader renames the
 * keys here) and stored runs and grids are rewritten by the database migration
 * `Migration20261205103000_settings_keys_g`.
 */
export const RENAMED_SETTING_KEYS: Readonly<Record<string, string>> = Object.freeze({
  embedSize: 'embeddingSize',
  obsHidden: 'observationHidden',
});

/** The settings with old key names replaced (a new object; other values untouched; a new key wins over an old one). */
export function renameLegacySettingKeys<T>(settings: T): T {
  if (!settings || typeof settings !== 'object' || Array.isArray(settings)) return settings;
  const src = settings as Record<string, unknown>;
  if (!Object.keys(RENAMED_SETTING_KEYS).some((k) => k in src)) return settings;
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(src)) {
    const renamed = RENAMED_SETTING_KEYS[key];
    if (renamed === undefined) out[key] = value;
    else if (!(renamed in src)) out[renamed] = value;
  }
  return out as T;
}
