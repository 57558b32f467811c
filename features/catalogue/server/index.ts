import "server-only";
export { getCatalogue } from "./queries";
export { seedCatalogue, speciesIdOf } from "./seed";
export {
  getClubSettings,
  getClubSettingsForEdit,
  hasDemoData,
  updateClubSettings,
  type ClubSettings,
  type ClubSettingsForEdit,
} from "./club";
export { planDoseFromQuery } from "./dose";
export {
  listCatalogue,
  createCatalogueEntry,
  updateCatalogueEntry,
  deleteCatalogueEntry,
  mergeSpecies,
  getCatalogueChanges,
} from "./admin";
