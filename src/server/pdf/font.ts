import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

/**
 * Inter as static TrueType files from an npm font package, for pdfkit (which cannot embed
 * the variable WOFF2 the pages use). Same family as the screens; regular and semibold.
 */
export const INTER_REGULAR = require.resolve('@expo-google-fonts/inter/400Regular/Inter_400Regular.ttf');
export const INTER_SEMIBOLD = require.resolve('@expo-google-fonts/inter/600SemiBold/Inter_600SemiBold.ttf');
