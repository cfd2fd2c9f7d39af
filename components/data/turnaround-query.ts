import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';
import type { TurnaroundFigures } from '../../shared/turnaround/figures';
import type { UnsignedList } from '../../shared/turnaround/unsigned';
import type { TurnaroundQuery } from '../../shared/turnaround/query';

const turnaroundKeys = {
  all: ['turnaround'] as const,
  awaitingSignature: () => [...turnaroundKeys.all, 'awaiting-signature'] as const,
  figures: (range: TurnaroundQuery) => [...turnaroundKeys.all, 'figures', range.from, range.to] as const,
};

/** Unsigned studies, longest waiting first, with their age and owner against the target. */
export const useAwaitingSignatureQuery = () =>
  useQuery({
    queryKey: turnaroundKeys.awaitingSignature(),
    queryFn: () => apiFetch<UnsignedList>('/turnaround/awaiting-signature'),
  });

const figuresPath = (range: TurnaroundQuery) => `/turnaround/figures?${new URLSearchParams({ from: range.from, to: range.to }).toString()}`;
export const exportHref = (range: TurnaroundQuery) => `/api/turnaround/export?${new URLSearchParams({ from: range.from, to: range.to }).toString()}`;

/** Turnaround and quality figures of a range of days; the last figures stay on screen while a new range loads. */
export const useTurnaroundFigures = (range: TurnaroundQuery | null) =>
  useQuery({
    queryKey: range ? turnaroundKeys.figures(range) : [...turnaroundKeys.all, 'figures', 'none'],
    queryFn: () => apiFetch<TurnaroundFigures>(figuresPath(range!)),
    enabled: !!range,
    placeholderData: keepPreviousData,
  });
