import { timesheetImports } from '../../../../../server/services/import-routes.ts';

export const { POST } = timesheetImports.commit;
