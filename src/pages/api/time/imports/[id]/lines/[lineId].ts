import { timesheetImports } from '../../../../../../server/services/import-routes.ts';

export const { PATCH } = timesheetImports.line;
