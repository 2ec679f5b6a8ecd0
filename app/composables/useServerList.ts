/**
 * State and fetch of a server-paged, sorted, filtered list: page, search, sort, direction and
 * any filters become the query; changing a filter or the search goes back to page 1.
 */
export function useServerList<Row, F extends Record<string, string | undefined>>(
  key: string,
  url: string,
  opts: { sort: string, dir?: 'asc' | 'desc', pageSize?: number, filters: F },
) {
  const page = ref(1)
  const q = ref('')
  const sort = ref(opts.sort)
  const dir = ref<'asc' | 'desc'>(opts.dir ?? 'asc')
  const filters = reactive({ ...opts.filters }) as F
  const pageSize = opts.pageSize ?? 20
  const debouncedQ = ref('')
  let timer: ReturnType<typeof setTimeout> | undefined
  watch(q, (v) => {
    clearTimeout(timer)
    timer = setTimeout(() => { debouncedQ.value = v.trim() }, 250)
  })
  watch([debouncedQ, () => ({ ...filters }), sort, dir], () => { page.value = 1 }, { deep: true })
  const query = computed(() => {
    const f = Object.fromEntries(Object.entries(filters).filter(([, v]) => v !== undefined && v !== ''))
    return { page: page.value, pageSize, q: debouncedQ.value || undefined, sort: sort.value, dir: dir.value, ...f }
  })
  const fetched = useFetch<{ rows: Row[], total: number, page: number, pageSize: number }>(url, {
    key,
    query,
    default: () => ({ rows: [], total: 0, page: 1, pageSize }),
  })
  return { page, q, sort, dir, filters, pageSize, ...fetched }
}
