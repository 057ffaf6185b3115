import { timesheetImports } from '../../../../../server/services/import-routes.ts';

export const { GET } = timesheetImports.file;
