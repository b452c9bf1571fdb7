// Opens a lab file and gives its LabApi; the one place shells get a service from.
import { openLabDb, type OpenOptions } from '../../db/store';
import type { LabApi } from './contract';
import { closeImportWriter } from './import-writer';
import { createLabService, type Clock } from './service';

export interface OpenedLab {
  api: LabApi;
  close(): void;
}

export function openApi(
  file: string,
  options: OpenOptions & { clock?: Clock; actor?: string } = {},
): OpenedLab {
  const db = openLabDb(file, options);
  const api = createLabService(db, { clock: options.clock, actor: options.actor });
  return {
    api,
    close: () => {
      // The import writer's own connection, if it has one, is closed by its thread.
      void closeImportWriter(db);
      db.close();
    },
  };
}
