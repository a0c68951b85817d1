import { useMutation, useQueryClient } from '@tanstack/react-query';
import { confirmSignUpBody, type ConfirmSignUpBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const confirmSignUpInputSchema = confirmSignUpBody;

/** Creates the account with the token from the confirmation mail and signs in. */
export function confirmSignUp(input: ConfirmSignUpBody) {
  return callRoute('confirmSignUp', { body: input });
}

export function useConfirmSignUp() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: confirmSignUp,
    onSuccess: ({ user }) => {
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== 'me' });
      qc.setQueryData(queryKeys.me, user);
    },
  });
}
