import { useMutation } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import {
  checkResponseSchema,
  correctedCheckResponseSchema,
  correctedWeighingResponseSchema,
  weighingResponseSchema,
  type CheckInput,
  type CorrectCheckInput,
  type CorrectWeighingInput,
  type WeighingInput,
} from '../../../../shared/schemas/coupons';
import { photoResponseSchema } from '../../../../shared/schemas/runs';
import { useInvalidate } from '../../../lib/queries/invalidate';

/** A reading changes the coupon's results, its run's and trial's progress, the bench and every analysis. */
function useInvalidateCoupons() {
  const invalidate = useInvalidate();
  return () => invalidate('measurements');
}

export function useAddWeighing(couponId: number) {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: (input: WeighingInput) => api.post(`/coupons/${couponId}/weighings`, input, weighingResponseSchema),
    onSuccess: invalidate,
  });
}

export function useAddCheck(couponId: number) {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: (input: CheckInput) => api.post(`/coupons/${couponId}/checks`, input, checkResponseSchema),
    onSuccess: invalidate,
  });
}

export function useCorrectWeighing() {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: ({ id, ...input }: CorrectWeighingInput & { id: number }) => api.patch(`/weighings/${id}`, input, correctedWeighingResponseSchema),
    onSuccess: invalidate,
  });
}

export function useCorrectCheck() {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: ({ id, ...input }: CorrectCheckInput & { id: number }) => api.patch(`/checks/${id}`, input, correctedCheckResponseSchema),
    onSuccess: invalidate,
  });
}

export function useUploadCouponPhoto(couponId: number) {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: (form: FormData) => api.post(`/coupons/${couponId}/photos`, form, photoResponseSchema),
    onSuccess: invalidate,
  });
}
