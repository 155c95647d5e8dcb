/** CSV uploads (doors and keys): one file of at most 1 MB, kept in memory; errors.ts turns multer's errors into 413 or 400. */
import multer from 'multer';

export const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: 1024 * 1024, files: 1 } });
