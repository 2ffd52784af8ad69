// Loading skeletons sit in each section rather than above the whole shelf, so that a refusal by a layout
// (e.g. Admin's) is answered before streaming starts and keeps its 403 status.
export { PageLoading as default } from '@/components/shell/PageLoading';
