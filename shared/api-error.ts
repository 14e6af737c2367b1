// The one error shape every API error uses: {"error":{"code","message","issues"?}}.
export interface ApiIssue {
  path: string;
  message: string;
}
export interface ApiErrorBody {
  error: { code: string; message: string; issues?: ApiIssue[] };
}
export type ApiErrorCode =
  | 'bad_request'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'payload_too_large'
  | 'unsupported_media_type'
  | 'too_many_requests'
  | 'insufficient_storage'
  | 'unavailable'
  | 'internal';
