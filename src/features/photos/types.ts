import type { PhotoView, PhotoViewWithSuggestions } from '#shared/schemas/photos.ts';

export type Photo = PhotoView;
export type PhotoWithSuggestions = PhotoViewWithSuggestions;

/** Kept in step with the server's default (MAX_UPLOAD_BYTES); the server has the last word. */
export const MAX_UPLOAD_BYTES = 25 * 1024 * 1024;
