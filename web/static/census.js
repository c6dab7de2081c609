// census.js keeps the census form's total of patients against the ward's
// beds current while typing. The page works without it: the server writes
// the same sentence on every render, after a submit included. Served as
// a file so that the Content-Security-Policy needs no inline script.
(function () {
	"use strict";
	var total = document.getElementById("census-total");
	if (!total) {
		return;
	}
	var form = total.closest("form");
	var beds = parseInt(total.getAttribute("data-beds"), 10) || 0;
	var inputs = form.querySelectorAll('[data-testid="tier-field"] input');

	function update() {
		var sum = 0, unread = 0;
		inputs.forEach(function (input) {
			var v = input.value.trim();
			if (v === "") {
				return;
			}
			if (!/^[0-9]+$/.test(v)) {
				unread++;
				return;
			}
			sum += parseInt(v, 10);
		});
		var text = sum === 1 ? "1 patient" : sum + " patients";
		var over = false;
		if (beds > 0) {
			text += " of " + beds + " beds";
			over = sum > beds;
		}
		if (over) {
			text += ": more patients than beds";
		}
		if (unread === 1) {
			text += " (1 field is not a whole number and is not counted)";
		} else if (unread > 1) {
			text += " (" + unread + " fields are not whole numbers and are not counted)";
		}
		total.textContent = text + ".";
		total.classList.toggle("is-over", over);
	}

	inputs.forEach(function (input) {
		input.addEventListener("input", update);
	});
})();
