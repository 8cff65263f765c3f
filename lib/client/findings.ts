import type { FindingDetailDto, FindingDto } from '@/lib/dal/findings';
import type { FindingChangeInput, FindingInput } from '@/lib/findings/rules';
import { apiSend } from './api';

/** The findings resource in the browser: record a finding, change its status or comment on it. */
export function recordFinding(input: FindingInput): Promise<FindingDto> {
  return apiSend('POST', '/api/findings', input);
}

export function changeFinding(id: number, change: FindingChangeInput): Promise<FindingDetailDto> {
  return apiSend('PATCH', `/api/findings/${id}`, change);
}
