export { getCatalogue } from "./queries";
export { seedCatalogue, speciesIdOf } from "./seed";
export { changeClubSettings, getClubSettings, hasDemoData, updateClubSettings, type ClubSettings } from "./club";
export { planDoseFromQuery } from "./dose";
export { listCatalogue, createCatalogueEntry, updateCatalogueEntry, deleteCatalogueEntry, mergeSpecies, getCatalogueChanges } from "./admin";
