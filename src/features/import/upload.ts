// The upload helper lives in lib/ (other features send files with progress too).
export { uploadWithProgress, type UploadProgress } from '../../lib/upload.ts';
