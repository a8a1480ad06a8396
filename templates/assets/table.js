// Variant index: sort by column, filter by gene / call / assay / flag, and search.
// Progressive enhancement: without this script the full table is shown and the form stays hidden.
(function () {
  'use strict';
  var table = document.getElementById('variant-table');
  var form = document.getElementById('variant-filters');
  if (!table || !form) return;
  var tbody = table.tBodies[0];
  var rows = Array.prototype.slice.call(tbody.rows);
  var searchText = {};
  try {
    searchText = JSON.parse(document.getElementById('variant-search').textContent || '{}');
  } catch (e) {
    searchText = {};
  }
  var status = document.getElementById('filter-status');
  form.hidden = false;

  function apply() {
    var q = form.elements.q.value.trim().toLowerCase();
    var gene = form.elements.gene.value;
    var call = form.elements.call.value;
    var assay = form.elements.assay.value;
    var flag = form.elements.flag.value;
    var shown = 0;
    rows.forEach(function (row) {
      var flags = row.getAttribute('data-flags') ? row.getAttribute('data-flags').split(' ') : [];
      var ok =
        (!gene || row.getAttribute('data-gene') === gene) &&
        (!call || row.getAttribute('data-call') === call) &&
        (!assay || (' ' + row.getAttribute('data-assays') + ' ').indexOf(' ' + assay + ' ') >= 0) &&
        (!flag || (flag === '*' ? flags.length > 0 : flag === '-' ? flags.length === 0 : flags.indexOf(flag) >= 0)) &&
        (!q || (searchText[row.getAttribute('data-id')] || row.textContent.toLowerCase()).indexOf(q) >= 0);
      row.hidden = !ok;
      if (ok) shown++;
    });
    status.textContent = shown === rows.length ? 'Showing all ' + rows.length + ' variants.' : 'Showing ' + shown + ' of ' + rows.length + ' variants.';
  }

  function cellValue(row, index, kind) {
    var cell = row.cells[index];
    var raw = cell.hasAttribute('data-value') ? cell.getAttribute('data-value') : cell.textContent.trim();
    if (kind === 'number') {
      var n = parseFloat(raw);
      return isNaN(n) ? null : n;
    }
    return raw === '' || raw === '—' ? null : raw.toLowerCase();
  }

  var headers = Array.prototype.slice.call(table.tHead.rows[0].cells);
  headers.forEach(function (th, index) {
    var kind = th.getAttribute('data-sort');
    if (!kind) return;
    var button = document.createElement('button');
    button.type = 'button';
    button.className = 'sort';
    button.textContent = th.textContent;
    th.textContent = '';
    th.appendChild(button);
    th.setAttribute('aria-sort', 'none');
    button.addEventListener('click', function () {
      var dir = th.getAttribute('aria-sort') === 'ascending' ? 'descending' : 'ascending';
      headers.forEach(function (h) { if (h.hasAttribute('aria-sort')) h.setAttribute('aria-sort', 'none'); });
      th.setAttribute('aria-sort', dir);
      var sign = dir === 'ascending' ? 1 : -1;
      var sorted = rows.slice().sort(function (a, b) {
        var x = cellValue(a, index, kind);
        var y = cellValue(b, index, kind);
        // Empty cells (no residue, no domain) go last in either direction.
        if (x === null || y === null) return x === y ? rows.indexOf(a) - rows.indexOf(b) : x === null ? 1 : -1;
        if (x < y) return -sign;
        if (x > y) return sign;
        return rows.indexOf(a) - rows.indexOf(b);
      });
      sorted.forEach(function (row) { tbody.appendChild(row); });
    });
  });

  form.addEventListener('input', apply);
  form.addEventListener('change', apply);
  form.addEventListener('reset', function () { setTimeout(apply, 0); });
  form.addEventListener('submit', function (e) { e.preventDefault(); });
  apply();
})();
