/** Text for SQL LIKE and ILIKE that matches only itself: `%`, `_` and the backslash (PostgreSQL's escape character) escaped. */
export const likeText = (text: string): string => text.replace(/[%_\\]/g, (c) => `\\${c}`);
