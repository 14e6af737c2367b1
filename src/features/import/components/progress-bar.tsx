// The progress bar is shared UI (components/); kept here for the import page's imports.
export { ProgressBar } from '../../../components/progress-bar.tsx';
