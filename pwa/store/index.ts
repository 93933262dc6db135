/** The field app's store: import everything from here. */
export {
  openFieldStore,
  newSite,
  newPick,
  newEstimate,
  requestPersistentStorage,
  StoreError,
  type FieldStore,
  type IncomingOptions,
  type NewPickFields,
  type PersistenceAnswer,
} from './field-store';
export { pickOf } from './validate';
export { SCHEMA_VERSION, type OutboxEntry, type FieldDB, type FieldDBv1 } from './schema';
export type { AnyRecord, EstimateRecord, PickRecord, SiteRecord, EstimateSettings, SiteLocation } from '../../core/exchange/records';
