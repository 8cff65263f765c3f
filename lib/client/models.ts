import type { ModelDetailDto, ModelInput } from '@/lib/dal/models';
import { apiSend } from './api';

/** The register of consuming models in the browser: register, change, rotate the webhook secret, send a test event. */
export function createModel(input: ModelInput): Promise<{ model: ModelDetailDto; webhookSecret: string | null }> {
  return apiSend('POST', '/api/models', input);
}

export function updateModel(id: number, input: Partial<ModelInput>): Promise<{ model: ModelDetailDto; webhookSecret: string | null }> {
  return apiSend('PATCH', `/api/models/${id}`, input);
}

export function rotateSecret(id: number): Promise<{ webhookSecret: string }> {
  return apiSend('POST', `/api/models/${id}/secret`);
}

export function pingModel(id: number): Promise<{ deliveryId: string }> {
  return apiSend('POST', `/api/models/${id}/ping`);
}
