import { receiptImports } from '../../../../../server/services/import-routes.ts';

export const { POST } = receiptImports.commit;
