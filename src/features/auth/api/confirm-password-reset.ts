import { useMutation, useQueryClient } from '@tanstack/react-query';
import { passwordResetConfirmBody, type PasswordResetConfirmBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const confirmPasswordResetInputSchema = passwordResetConfirmBody;

export function confirmPasswordReset(input: PasswordResetConfirmBody) {
  return callRoute('confirmPasswordReset', { body: input });
}

export function useConfirmPasswordReset() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: confirmPasswordReset,
    // the server ends every session of that user, including this browser's
    onSuccess: () => {
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== 'me' });
      qc.setQueryData(queryKeys.me, null);
    },
  });
}
