import { receiptImports } from '../../../../server/services/import-routes.ts';

export const { GET, POST } = receiptImports.collection;
