import { receiptImports } from '../../../../../../server/services/import-routes.ts';

export const { PATCH } = receiptImports.line;
