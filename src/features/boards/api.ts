import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api';
import type { Board, Panel, PanelData } from '@schemas/boards';

export type { Board, Panel, PanelData };

export const useBoards = () => useQuery({ queryKey: ['boards'], queryFn: () => api<{ items: Board[] }>('/boards').then((r) => r.items) });
export const useBoard = (id: number) => useQuery({ queryKey: ['board', id], queryFn: () => api<Board & { panels: Panel[] }>(`/boards/${id}`), refetchInterval: 60_000 });
/** Panels re-read their data every 30 s, so a board shows a new vintage soon after it is loaded. */
export const usePanelData = (boardId: number, panel: Panel) =>
  useQuery({ queryKey: ['panel', panel.id, panel.updatedAt], queryFn: () => api<PanelData>(`/boards/${boardId}/panels/${panel.id}/data`), refetchInterval: 30_000 });

export function useBoardMutations(boardId?: number) {
  const qc = useQueryClient();
  const refresh = () => {
    qc.invalidateQueries({ queryKey: ['board', boardId] });
    qc.invalidateQueries({ queryKey: ['boards'] });
  };
  return {
    create: useMutation({ mutationFn: (body: Record<string, unknown>) => api<Board>('/boards', { method: 'POST', json: body }), onSuccess: refresh }),
    update: useMutation({ mutationFn: (body: Record<string, unknown>) => api<Board>(`/boards/${boardId}`, { method: 'PATCH', json: body }), onSuccess: refresh }),
    remove: useMutation({ mutationFn: () => api(`/boards/${boardId}`, { method: 'DELETE' }), onSuccess: refresh }),
    addPanel: useMutation({ mutationFn: (body: Record<string, unknown>) => api<Panel>(`/boards/${boardId}/panels`, { method: 'POST', json: body }), onSuccess: refresh }),
    updatePanel: useMutation({ mutationFn: ({ id, ...body }: { id: number } & Record<string, unknown>) => api<Panel>(`/boards/${boardId}/panels/${id}`, { method: 'PATCH', json: body }), onSuccess: refresh }),
    removePanel: useMutation({ mutationFn: (id: number) => api(`/boards/${boardId}/panels/${id}`, { method: 'DELETE' }), onSuccess: refresh }),
    reorder: useMutation({ mutationFn: (panelIds: number[]) => api(`/boards/${boardId}/panels/order`, { method: 'PUT', json: { panelIds } }), onSuccess: refresh }),
  };
}
