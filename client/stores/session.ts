import { computed, ref, watch } from 'vue';
import { defineStore } from 'pinia';
import { Me, type BadgeSignInBody, type SignInBody } from '@shared/auth';
import { ApiError } from '@client/api/http';
import * as authApi from '@client/api/auth';
import type { SignInMode } from '@client/router/access';
import { setDisplayTimeZone } from '@client/utils/format';

const SITE_KEY = 'aislewright.siteId';
const MODE_KEY = 'aislewright.signInMode';
/** Who last signed in on this device, so a reload with no network reopens their screen (the app shell is offline too). */
const ME_KEY = 'aislewright.me';

function readStoredMe(): Me | null {
  try {
    const parsed = Me.safeParse(JSON.parse(localStorage.getItem(ME_KEY) ?? 'null'));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}
function storeMe(next: Me | null): void {
  if (next) localStorage.setItem(ME_KEY, JSON.stringify(next));
  else localStorage.removeItem(ME_KEY);
}

function readStoredSiteId(): number | null {
  const raw = localStorage.getItem(SITE_KEY);
  const id = raw === null ? NaN : Number(raw);
  return Number.isInteger(id) && id > 0 ? id : null;
}

export const useSessionStore = defineStore('session', () => {
  const me = ref<Me | null>(null);
  const loaded = ref(false);
  /** True while the signed-in user comes from this device's copy because the server could not be reached. */
  const offline = ref(false);
  const storedSiteId = ref<number | null>(readStoredSiteId());
  // A shared tablet should come back to the badge page after a session ends, not the office form.
  const signInMode = ref<SignInMode>(localStorage.getItem(MODE_KEY) === 'badge' ? 'badge' : 'email');
  let loading: Promise<void> | null = null;

  const role = computed(() => me.value?.role ?? null);
  const sites = computed(() => me.value?.sites ?? []);
  /** The stored choice when the user still belongs to that site, else their first site. */
  const currentSite = computed(() => sites.value.find((s) => s.id === storedSiteId.value) ?? sites.value[0] ?? null);
  const siteId = computed(() => currentSite.value?.id ?? null);
  // Every time on screen and on printed pick lists is shown in the current site's zone.
  watch(
    () => currentSite.value?.timezone,
    (zone) => setDisplayTimeZone(zone),
    { immediate: true },
  );

  function setSignedIn(next: Me, mode: SignInMode): void {
    me.value = next;
    storeMe(next);
    offline.value = false;
    loaded.value = true;
    signInMode.value = mode;
    localStorage.setItem(MODE_KEY, mode);
  }

  /** Reads who is signed in once; later calls wait for the same answer. */
  function ensureLoaded(): Promise<void> {
    if (loaded.value) return Promise.resolve();
    loading ??= authApi
      .getMe()
      .then((answer) => {
        me.value = answer;
        storeMe(answer);
        offline.value = false;
      })
      .catch((e: unknown) => {
        // No network (a reload in a Wi-Fi gap): carry on as whoever signed in on this device last;
        // the server still checks the session on every write when the network is back.
        const saved = e instanceof ApiError && e.status === 0 ? readStoredMe() : null;
        offline.value = saved !== null;
        // Not signed in is the ordinary start; a server that cannot be reached with nobody saved
        // also lands on sign-in, where submitting shows what went wrong.
        me.value = saved;
      })
      .finally(() => {
        loaded.value = true;
        loading = null;
      });
    return loading;
  }

  async function signIn(body: SignInBody): Promise<Me> {
    const answer = await authApi.signIn(body);
    setSignedIn(answer, 'email');
    return answer;
  }

  async function badgeSignIn(body: BadgeSignInBody): Promise<Me> {
    const answer = await authApi.badgeSignIn(body);
    setSignedIn(answer, 'badge');
    return answer;
  }

  function adopt(answer: Me): void {
    setSignedIn(answer, answer.role === 'picker' ? 'badge' : 'email');
  }

  /** Drops the local session (after sign-out, or when the server says it has ended). */
  function forget(): void {
    me.value = null;
    storeMe(null);
    offline.value = false;
    loaded.value = true;
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut();
    } finally {
      forget();
    }
  }

  /** Ends every session of this user on the server (other devices included), then this one locally. */
  async function signOutEverywhere(): Promise<number> {
    try {
      return (await authApi.signOutEverywhere()).ended;
    } finally {
      forget();
    }
  }

  function selectSite(id: number): void {
    storedSiteId.value = id;
    localStorage.setItem(SITE_KEY, String(id));
  }

  return {
    me,
    loaded,
    offline,
    role,
    sites,
    currentSite,
    siteId,
    signInMode,
    ensureLoaded,
    signIn,
    badgeSignIn,
    adopt,
    forget,
    signOut,
    signOutEverywhere,
    selectSite,
  };
});
