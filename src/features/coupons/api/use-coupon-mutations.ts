import { useMutation } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../../lib/api-client';
import {
  checkResponseSchema,
  checkSchema,
  couponSchema,
  measurementWarningSchema,
  weighingResponseSchema,
  weighingSchema,
  type CheckInput,
  type CorrectCheckInput,
  type CorrectWeighingInput,
  type WeighingInput,
} from '../../../../shared/schemas/coupons';
import { photoSchema } from '../../../../shared/schemas/runs';
import { useInvalidate } from '../../../lib/queries/invalidate';

const correctedWeighingSchema = z.object({
  weighing: weighingSchema,
  superseded: weighingSchema,
  coupon: couponSchema,
  warnings: z.array(measurementWarningSchema),
});
const correctedCheckSchema = z.object({ check: checkSchema, superseded: checkSchema, coupon: couponSchema, warnings: z.array(measurementWarningSchema) });
const photoResponseSchema = z.object({ photo: photoSchema });

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
    mutationFn: ({ id, ...input }: CorrectWeighingInput & { id: number }) => api.patch(`/weighings/${id}`, input, correctedWeighingSchema),
    onSuccess: invalidate,
  });
}

export function useCorrectCheck() {
  const invalidate = useInvalidateCoupons();
  return useMutation({
    mutationFn: ({ id, ...input }: CorrectCheckInput & { id: number }) => api.patch(`/checks/${id}`, input, correctedCheckSchema),
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
