import React, { createContext, useCallback, useContext, useMemo, useState } from "react";
import { Platform } from "react-native";
import { useMe, type MeLab } from "./use-me";

const STORAGE_KEY = "linger.currentLabId";

function readStored(): string | null {
  if (Platform.OS !== "web" || typeof window === "undefined") return null;
  try {
    return window.localStorage.getItem(STORAGE_KEY);
  } catch {
    return null;
  }
}

type Ctx = { chosenId: string | null; choose: (id: string) => void };
const CurrentLabContext = createContext<Ctx>({ chosenId: null, choose: () => {} });

/** Remembers the chosen lab (localStorage on the web). */
export function CurrentLabProvider({ children }: { children: React.ReactNode }) {
  const [chosenId, setChosen] = useState<string | null>(() => readStored());
  const choose = useCallback((id: string) => {
    setChosen(id);
    if (Platform.OS === "web" && typeof window !== "undefined") {
      try {
        window.localStorage.setItem(STORAGE_KEY, id);
      } catch {
        /* private mode: remember for this session only */
      }
    }
  }, []);
  const value = useMemo(() => ({ chosenId, choose }), [chosenId, choose]);
  return <CurrentLabContext.Provider value={value}>{children}</CurrentLabContext.Provider>;
}

/** The current lab: the remembered one if the user still belongs to it, else the first. */
export function useCurrentLab(): { lab: MeLab | null; labs: MeLab[]; choose: (id: string) => void; canEdit: boolean } {
  const { chosenId, choose } = useContext(CurrentLabContext);
  const me = useMe();
  const labs = me.data?.labs ?? [];
  const lab = labs.find((l) => l.id === chosenId) ?? labs[0] ?? null;
  return { lab, labs, choose, canEdit: lab?.role === "owner" || lab?.role === "editor" };
}

/** The current lab id, for lab-scoped hooks (empty string while unknown; hooks disable themselves). */
export function useLabId(): string {
  return useCurrentLab().lab?.id ?? "";
}
