import { receiptImports } from '../../../../../server/services/import-routes.ts';

export const { GET, PUT, DELETE } = receiptImports.item;
