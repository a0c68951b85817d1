import { useMutation } from '@tanstack/react-query';
import { passwordResetRequestBody, type PasswordResetRequestBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';

export const requestPasswordResetInputSchema = passwordResetRequestBody;

export function requestPasswordReset(input: PasswordResetRequestBody) {
  return callRoute('requestPasswordReset', { body: input });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}
