// Jobs: the jobs on this server. With one job, or on start with the job
// used last, go straight to it. The list is kept for offline starts.

import { h, message } from '../ui.js';

let recheck = 0; // the next look for jobs while the list is empty

export async function render(ctx) {
  const { api, store } = ctx;
  let jobs = store.metaSync('jobs') || [];
  let problem = '';
  try {
    const res = await api.get('/jobs');
    jobs = res.jobs || [];
    store.setMeta('jobs', jobs).catch(() => {});
  } catch (e) {
    if (e.status === 401) return h('div');
    problem = jobs.length
      ? 'The server cannot be reached; these are the jobs this device saw last.'
      : `The server cannot be reached (${e.message}). Check the site Wi-Fi.`;
  }

  const last = store.metaSync('lastJob');
  const listAsked = ctx.params.list === '1';
  if (!listAsked) {
    const target = jobs.length === 1 ? jobs[0].id
      : ctx.params.auto && last && jobs.some((j) => j.id === last) ? last : null;
    if (target) {
      ctx.replace(`#/job/${encodeURIComponent(target)}`);
      return h('p', { class: 'loading' }, 'Opening the job…');
    }
  }

  const lead = ctx.role === 'lead';
  // An empty store: the lead starts the first job right here.
  if (!jobs.length && lead && !problem) return (await import('./edit.js')).render(ctx);
  clearTimeout(recheck);
  if (!jobs.length) {
    // A crew phone that joined before the lead made the job looks again, so
    // the job opens here without a reload.
    recheck = setTimeout(() => { if (/^(#\/?(jobs)?)?$/.test(location.hash)) ctx.rerender(); }, 5000);
  }
  return h('div', { 'data-test': 'jobs' },
    h('div', { class: 'screen-head' }, h('h1', {}, 'Jobs')),
    problem ? message(jobs.length ? 'info' : 'error', problem) : null,
    h('section', { class: 'card' },
      jobs.length ? h('ul', { class: 'list' }, jobs.map((j) =>
        h('li', {}, h('a', { class: 'item', href: `#/job/${encodeURIComponent(j.id)}`, 'data-test': 'job-item', 'data-name': j.name },
          h('span', { class: 'tag' }, j.name),
          h('span', { class: 'room' }, [j.site_address, j.status].filter(Boolean).join(' · ')))))) :
        h('p', {}, lead ? 'No jobs yet.' : 'No jobs yet. Ask your lead to create the job in the app.')),
    h('p', { class: 'actions' }, lead ? h('a', { class: 'btn', href: '#/new-job', 'data-test': 'new-job' }, 'New job') : null,
      h('a', { class: 'btn secondary', href: '#/join' }, 'Join with another code')));
}
